/** Separator purge schedule: pure logic shared by server and browser (no I/O). */
export * from './input';
export * from './schedule';
export * from './describe';
export * from './proof';
export * from './trend';
