/** Alarm logic shared by the server's rules engine and the browser: pure, no I/O. */
export * from './types';
export * from './state-machine';
export * from './debounce';
export * from './stuck';
export * from './conditions';
