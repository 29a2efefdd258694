// comlink has no exports map: plain Node needs the .mjs file, which ships no types of its own.
declare module 'comlink/dist/esm/node-adapter.mjs' {
  export { default } from 'comlink/dist/esm/node-adapter';
}
