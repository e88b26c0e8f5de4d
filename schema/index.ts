/** Every table of the database. Later features add their own file here and re-export it. */
export * from './users';
export * from './teams';
export * from './sessions';
export * from './worksheets';
export * from './mail';
export * from './rate-limits';
