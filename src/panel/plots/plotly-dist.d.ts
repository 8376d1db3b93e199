// plotly.js-cartesian-dist-min ships no types of its own; the plots use the small surface in
// ./plotly.ts.
declare module 'plotly.js-cartesian-dist-min' {
  const Plotly: unknown;
  export default Plotly;
}
