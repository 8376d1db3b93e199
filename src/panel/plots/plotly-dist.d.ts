// plotly.js-dist-min ships no types of its own; the plots use the small surface in ./plotly.ts.
declare module 'plotly.js-dist-min' {
  const Plotly: unknown;
  export default Plotly;
}
