/**
 * Colour-blind-safe qualitative palette: Okabe, M. & Ito, K. (2008), "Color Universal Design (CUD):
 * How to make figures and presentations that are friendly to colorblind people" (J*FLY). Yellow
 * (#F0E442) is left out: it has too little contrast on a white page for thin lines.
 */
export const OKABE_ITO = {
  black: '#000000',
  orange: '#E69F00',
  skyBlue: '#56B4E9',
  bluishGreen: '#009E73',
  blue: '#0072B2',
  vermillion: '#D55E00',
  reddishPurple: '#CC79A7',
} as const;

/** Series colours in the order plots use them. */
export const SERIES_COLOURS: readonly string[] = [
  OKABE_ITO.blue,
  OKABE_ITO.vermillion,
  OKABE_ITO.bluishGreen,
  OKABE_ITO.reddishPurple,
  OKABE_ITO.orange,
  OKABE_ITO.skyBlue,
  OKABE_ITO.black,
];

/** Dash patterns paired with colours so curves stay distinct in greyscale print. */
export const SERIES_DASHES: readonly string[] = ['', '6 3', '2 2', '8 3 2 3', '1 3', '10 4', ''];

export const seriesColour = (i: number): string => SERIES_COLOURS[i % SERIES_COLOURS.length];
export const seriesDash = (i: number): string => SERIES_DASHES[i % SERIES_DASHES.length];

/**
 * Viridis (van der Walt & Smith 2015) sampled at nine even stops, as d3-scale-chromatic's
 * interpolateViridis gives them: enough for colouring a handful of curves by a quantity, without
 * shipping the full colour-map module to pages that only need line colours.
 */
export const VIRIDIS_STOPS: readonly string[] = ['#440154', '#472d7b', '#3b528b', '#2c728e', '#21918c', '#28ae80', '#5ec962', '#addc30', '#fde725'];
