/** An invented five-cell problem as the pieces form takes it (3 data), shared by the session tests. */
export const enc = (s: string) => new TextEncoder().encode(s);
const G = '%%MatrixMarket matrix coordinate real general\n3 5 5\n1 1 0.5\n1 2 0.5\n2 3 1\n3 4 0.5\n3 5 0.5\n';

/** The pieces of the problem "Five cells"; `dataCsv` replaces its data file. */
export const fiveCells = (dataCsv = 'value,sigma\n1,0.1\n2,0.1\n3,0.2\n') => ({
  grid: { shape: [5], spacing: [1], unit: 'm' },
  operator: { name: 'G.mtx', bytes: enc(G) },
  data: { name: 'd.csv', bytes: enc(dataCsv) },
  title: 'Five cells',
});
