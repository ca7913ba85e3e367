// cephes ships types that its package.json "exports" hides from the bundler resolution.
declare module "cephes" {
  const cephes: { compiled: Promise<void>; stdtr(k: number, t: number): number; stdtri(k: number, p: number): number };
  export default cephes;
}
