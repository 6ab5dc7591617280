export * from './linking.js';
export * from './components.js';
