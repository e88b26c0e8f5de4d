// jstat ships no type declarations; the engine wraps it behind typed functions.
declare module 'jstat' {
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  const jStat: any;
  export default jStat;
}
