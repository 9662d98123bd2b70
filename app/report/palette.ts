/**
 * Colour-blind-safe colours for the report's figures.
 *
 * Categorical (methods): Okabe, M., & Ito, K. (2008). Color Universal Design (CUD): How to make
 *   figures and presentations that are friendly to colorblind people. https://jfly.uni-koeln.de/color/
 *   (black first is left out: it is kept for text and reference lines).
 * Diverging (Likert scores, low to high): Paul Tol's "sunset" scheme, Tol, P. (2021). Colour
 *   Schemes. SRON/EPS/TN/09-002, https://personal.sron.nl/~pault/ — designed to stay distinct for
 *   the common colour-vision deficiencies and in grey scale.
 * Sequential (kappa heatmap): Paul Tol's "YlOrBr" sequential scheme, same source.
 */
export const OKABE_ITO = ['#E69F00', '#56B4E9', '#009E73', '#F0E442', '#0072B2', '#D55E00', '#CC79A7', '#000000'];

const SUNSET = ['#A50026', '#DD3D2D', '#F67E4B', '#FDB366', '#FEDA8B', '#EAECCC', '#C2E4EF', '#98CAE1', '#6EA6CD', '#4A7BB7', '#364B9A'];

/** `points` colours from the sunset scheme, low score first, spread evenly over the scheme. */
export function likertColours(points: number): string[] {
  if (points <= 1) return [SUNSET[5]];
  return Array.from({ length: points }, (_, i) => SUNSET[Math.round(1 + (i * (SUNSET.length - 3)) / (points - 1))]);
}

export const YL_OR_BR = ['#FFFFE5', '#FFF7BC', '#FEE391', '#FEC44F', '#FB9A29', '#EC7014', '#CC4C02', '#993404', '#662506'];

export const FONT = 'Helvetica, Arial, sans-serif';
