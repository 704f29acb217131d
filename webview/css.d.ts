// esbuild's `text` loader turns an imported .css file into its text (esbuild.mjs, webview target).
declare module '*.css' {
  const text: string;
  export default text;
}
