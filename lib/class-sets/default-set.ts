import type { ClassSet, MarkClass } from './schema';

/**
 * Okabe & Ito's colour-universal-design palette without its black (a black marker
 * vanishes on nigrosin backgrounds), plus white and a light grey for the extras.
 */
export const OKABE_ITO = {
  orange: '#E69F00',
  skyBlue: '#56B4E9',
  bluishGreen: '#009E73',
  yellow: '#F0E442',
  blue: '#0072B2',
  vermillion: '#D55E00',
  reddishPurple: '#CC79A7',
} as const;
export const WHITE = '#FFFFFF';
export const LIGHT_GREY = '#BBBBBB';

/*
 * Our own assignment. Every class has its own shape, so colour never carries the
 * meaning alone. Detached head sits in 'other', not 'head': the head itself is
 * usually normal (the fault is at the head–midpiece junction), and counting it with
 * head shape defects would inflate the head-defect total. Round cells and leukocytes
 * take letter keys r and l, so the digit row stays for sperm classes; both are grey
 * so "not a sperm cell" reads at a glance.
 */
const classes: MarkClass[] = [
  { key: 'normal', name: 'Normal', group: 'normal', hotkey: '1', colour: OKABE_ITO.bluishGreen, shape: 'circle', countsAsSperm: true },
  { key: 'abnormal_head', name: 'Abnormal head shape or size', group: 'head', hotkey: '2', colour: OKABE_ITO.orange, shape: 'triangle-up', countsAsSperm: true },
  { key: 'acrosome_defect', name: 'Acrosome defect', group: 'head', hotkey: '3', colour: OKABE_ITO.yellow, shape: 'triangle-down', countsAsSperm: true },
  { key: 'nuclear_vacuoles', name: 'Nuclear vacuoles', group: 'head', hotkey: '4', colour: OKABE_ITO.skyBlue, shape: 'diamond', countsAsSperm: true },
  { key: 'abnormal_midpiece', name: 'Abnormal midpiece', group: 'midpiece', hotkey: '5', colour: OKABE_ITO.reddishPurple, shape: 'square', countsAsSperm: true },
  { key: 'proximal_droplet', name: 'Proximal cytoplasmic droplet', group: 'droplet', hotkey: '6', colour: OKABE_ITO.vermillion, shape: 'pentagon', countsAsSperm: true },
  { key: 'distal_droplet', name: 'Distal cytoplasmic droplet', group: 'droplet', hotkey: '7', colour: OKABE_ITO.blue, shape: 'hexagon', countsAsSperm: true },
  { key: 'bent_coiled_tail', name: 'Bent or coiled tail', group: 'tail', hotkey: '8', colour: WHITE, shape: 'star', countsAsSperm: true },
  { key: 'detached_head', name: 'Detached head', group: 'other', hotkey: '9', colour: OKABE_ITO.yellow, shape: 'cross', countsAsSperm: true },
  { key: 'other', name: 'Other (premature germ cells, multiple tails …)', group: 'other', hotkey: '0', colour: WHITE, shape: 'plus', countsAsSperm: true },
  { key: 'round_cell', name: 'Round cell (germ cell)', group: 'non_sperm', hotkey: 'r', colour: LIGHT_GREY, shape: 'ring', countsAsSperm: false },
  { key: 'leukocyte', name: 'Leukocyte', group: 'non_sperm', hotkey: 'l', colour: LIGHT_GREY, shape: 'hourglass', countsAsSperm: false },
];

export const DEFAULT_CLASS_SET: Readonly<ClassSet> = Object.freeze({
  name: 'Equine default',
  classes: classes.map((c) => Object.freeze({ ...c })),
});
