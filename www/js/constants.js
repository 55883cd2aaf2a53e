// CSS class names and fixed strings of the page, in one place.

export const CLASS = {
  card: 'card',
  blurb: 'card-blurb',
  inputs: 'cells',
  cell: 'cell',
  cellName: 'cell-name',
  cellUnit: 'cell-unit',
  cellHint: 'cell-hint',
  formula: 'formula',
  cardMessage: 'card-message',
  results: 'results',
};

export const TOPOLOGY_CHOICES = [
  ['series-shunt', 'series-shunt · voltage amp'],
  ['shunt-series', 'shunt-series · current amp'],
  ['series-series', 'series-series · transconductance'],
  ['shunt-shunt', 'shunt-shunt · transresistance'],
];
