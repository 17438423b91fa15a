// maxrects-packer's package.json says "type": "module" but its "main" is a UMD script, which
// Node's ESM loader runs as a module that exports nothing; its "module" entry is real ESM.
// pack.ts imports that file directly; these are its types.
declare module 'maxrects-packer/dist/maxrects-packer.mjs' {
  export * from 'maxrects-packer'
}
