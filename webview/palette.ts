/**
 * Class colours and marker shapes. Colours are the Okabe–Ito palette (Okabe & Ito, "Color
 * Universal Design", 2008), a published set that stays distinguishable with the common forms of
 * colour blindness; black is left out because it vanishes on dark themes, and yellow comes last
 * because it is faint on light ones. Each class also gets its own marker shape, so colour is never
 * the only cue: class i has colour i mod 7 and shape i mod 8, distinct pairs for 56 classes.
 */
export const CLASS_COLOURS: readonly string[] = [
  '#0072B2', // blue
  '#E69F00', // orange
  '#009E73', // bluish green
  '#D55E00', // vermillion
  '#56B4E9', // sky blue
  '#CC79A7', // reddish purple
  '#F0E442', // yellow
];

export const MARKER_SHAPES = ['circle', 'square', 'triangle', 'diamond', 'triangle-down', 'plus', 'cross', 'star'] as const;
export type MarkerShape = (typeof MARKER_SHAPES)[number];

export function classColour(classIndex: number): string {
  return CLASS_COLOURS[classIndex % CLASS_COLOURS.length];
}

export function classShape(classIndex: number): MarkerShape {
  return MARKER_SHAPES[classIndex % MARKER_SHAPES.length];
}

const ARM = 0.38;
const REACH = 1.1;
const PLUS: readonly (readonly [number, number])[] = [
  [-ARM, -REACH], [ARM, -REACH], [ARM, -ARM], [REACH, -ARM], [REACH, ARM], [ARM, ARM],
  [ARM, REACH], [-ARM, REACH], [-ARM, ARM], [-REACH, ARM], [-REACH, -ARM], [-ARM, -ARM],
];
/** The plus turned by 45°. */
const CROSS = PLUS.map(([x, y]) => [Math.SQRT1_2 * (x - y), Math.SQRT1_2 * (x + y)] as const);

/** The shape's outline as polygon vertices around (0, 0) for radius 1; the circle is drawn as an arc. */
export function shapeVertices(shape: MarkerShape): readonly (readonly [number, number])[] {
  switch (shape) {
    case 'circle':
      return [];
    case 'square':
      return [[-0.85, -0.85], [0.85, -0.85], [0.85, 0.85], [-0.85, 0.85]];
    case 'triangle':
      return [[0, -1.15], [1.05, 0.75], [-1.05, 0.75]];
    case 'triangle-down':
      return [[0, 1.15], [1.05, -0.75], [-1.05, -0.75]];
    case 'diamond':
      return [[0, -1.2], [1.05, 0], [0, 1.2], [-1.05, 0]];
    case 'plus':
      return PLUS;
    case 'cross':
      return CROSS;
    case 'star': {
      const points: [number, number][] = [];
      for (let i = 0; i < 10; i++) {
        const radius = i % 2 === 0 ? 1.25 : 0.5;
        const angle = -Math.PI / 2 + (i * Math.PI) / 5;
        points.push([radius * Math.cos(angle), radius * Math.sin(angle)]);
      }
      return points;
    }
  }
}

/** The same marker as SVG path data, for the SVG export and the legend swatches. */
export function markerPathData(shape: MarkerShape, x: number, y: number, radius: number): string {
  const r = round(radius);
  if (shape === 'circle') return `M${round(x - radius)} ${round(y)}a${r} ${r} 0 1 0 ${round(2 * radius)} 0a${r} ${r} 0 1 0 ${round(-2 * radius)} 0z`;
  const vertices = shapeVertices(shape);
  let data = '';
  for (let i = 0; i < vertices.length; i++) {
    data += `${i === 0 ? 'M' : 'L'}${round(x + vertices[i][0] * radius)} ${round(y + vertices[i][1] * radius)}`;
  }
  return `${data}z`;
}

function round(value: number): number {
  return Math.round(value * 100) / 100;
}
