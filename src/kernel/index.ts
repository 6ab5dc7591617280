export * from './circleDistance.js';
export * from './gradient.js';
