// The JupyterLab extension builder loads .svg files imported from code as raw strings.
declare module '*.svg' {
  const svgstr: string;
  export default svgstr;
}
