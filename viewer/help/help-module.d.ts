// The docs rendered when the page was built (viewer/help/docs-plugin.ts).
declare module 'virtual:pycno-help' {
  const pages: Array<{ file: string; title: string; html: string }>;
  export default pages;
}
