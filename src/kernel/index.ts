export * from './circleDistance.js';
export * from './ringDistance.js';
export * from './pointCircle.js';
export * from './gradient.js';
export * from './frame.js';
export * from './broadphase.js';
