export * from './circleDistance.js';
