export * from './worksheet';
