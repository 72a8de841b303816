export * from '../auth.schema';
export * from './system';
export * from './catalogue';
export * from './quality';
export * from './inspection';
export * from './control';
export * from './stations';
