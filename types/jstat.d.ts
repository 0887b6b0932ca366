// jstat ships no types; the engine uses a handful of its functions through a narrow wrapper (lib/power/special.ts).
declare module "jstat" {
  const jStat: any;
  export default jStat;
}
