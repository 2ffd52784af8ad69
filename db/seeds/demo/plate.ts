// The large demo model of Quillmere Kilnworks: the hearth plate of the K-7 kiln car as a 2-D thermal network
// on an N × N grid of nodes (N = 150: 22,500 states). Invented values of the right order for a
// silicon-carbide plate 1.5 m × 1.5 m × 25 mm on an insulated kiln car; not taken from any real product.
//
// Each node stands for a cell of the plate (finite volumes on a square grid: a cell on an edge is half a
// cell, a corner a quarter), so the node temperatures obey the lumped network C dT/dt = −G T + P (e.g.
// Incropera et al., "Fundamentals of Heat and Mass Transfer", 6th ed. 2007, §4.4 and §5.10):
//
//   E = C   diagonal heat capacities ρ·c·(cell area)·t, J/K
//   A = −G  conductances k·t between neighbours (a full face: k·t·h/h; an edge face half that), and the
//           loss through the kiln car and to the kiln atmosphere U·(cell area) on the diagonal, W/K
//   B       the two heater zones under the plate (left and right third), their power shared over the
//           zone's cells by area, W per W
//   C       three thermocouples (plate centre, centre of the left zone, far corner), K above ambient
//
// so the model is in descriptor form E ẋ = A x + B u with a symmetric negative definite A and a diagonal
// positive E: every pole real and stable, from the plate's fastest cell mode (about 1 s) to the slow loss
// through the car (hours) — a stiff model. The files are Matrix Market coordinate (NISTIR 5935, 1996),
// written straight from the stencil: nothing here forms an n × n array, so any N can be generated.

/** Plate data (invented): silicon carbide, 1.5 m square, 25 mm thick, on an insulated kiln car. */
const SIDE_M = 1.5;
const THICKNESS_M = 0.025;
const CONDUCTIVITY = 25; // W/(m·K)
const VOLUMETRIC_HEAT = 2.34e6; // ρ·c, J/(m³·K)
const LOSS = 4; // W/(m²·K): through the car deck and to the kiln atmosphere together

export interface PlateFiles {
  /** states = side² */
  readonly states: number;
  readonly A: string;
  readonly E: string;
  readonly B: string;
  readonly C: string;
  readonly labels: { inputs: string[]; outputs: string[] };
}

const number = (x: number) => x.toPrecision(12).replace(/\.?0+(?=e|$)/, '');

/**
 * The hearth plate on a side × side grid (side ≥ 4). A is written "symmetric" (its lower triangle), E as its
 * diagonal, B (n × 2) and C (3 × n) as coordinate files of their nonzeros.
 */
export function hearthPlate(side = 150): PlateFiles {
  if (!Number.isInteger(side) || side < 4) throw new Error(`hearthPlate: side must be a whole number ≥ 4, got ${side}`);
  const N = side;
  const n = N * N;
  const h = SIDE_M / (N - 1);
  const id = (i: number, j: number) => i * N + j; // i: row (y), j: column (x)
  // Cell area: a full h × h cell, halved on an edge, quartered at a corner.
  const areaOf = (i: number, j: number) => h * h * (i === 0 || i === N - 1 ? 0.5 : 1) * (j === 0 || j === N - 1 ? 0.5 : 1);
  const fullFace = CONDUCTIVITY * THICKNESS_M; // k·t·h / h
  const lower: string[] = [];
  const diagonal = new Float64Array(n);
  for (let i = 0; i < N; i++) {
    for (let j = 0; j < N; j++) {
      const k = id(i, j);
      diagonal[k] -= LOSS * areaOf(i, j);
      // The face to the right neighbour (x) and to the one below (y); a face along an edge is half as wide.
      if (j + 1 < N) {
        const g = fullFace * (i === 0 || i === N - 1 ? 0.5 : 1);
        diagonal[k] -= g;
        diagonal[k + 1] -= g;
        lower.push(`${k + 2} ${k + 1} ${number(g)}`);
      }
      if (i + 1 < N) {
        const g = fullFace * (j === 0 || j === N - 1 ? 0.5 : 1);
        diagonal[k] -= g;
        diagonal[id(i + 1, j)] -= g;
        lower.push(`${id(i + 1, j) + 1} ${k + 1} ${number(g)}`);
      }
    }
  }
  const aLines: string[] = [];
  for (let k = 0; k < n; k++) aLines.push(`${k + 1} ${k + 1} ${number(diagonal[k])}`);
  aLines.push(...lower);
  const A =
    `%%MatrixMarket matrix coordinate real symmetric\n% K-7 kiln car hearth plate, ${N} x ${N} nodes: A = -G (conductances and losses, W/K)\n` +
    `${n} ${n} ${aLines.length}\n${aLines.join('\n')}\n`;
  const eLines: string[] = [];
  for (let i = 0; i < N; i++) for (let j = 0; j < N; j++) eLines.push(`${id(i, j) + 1} ${id(i, j) + 1} ${number(VOLUMETRIC_HEAT * THICKNESS_M * areaOf(i, j))}`);
  const E = `%%MatrixMarket matrix coordinate real symmetric\n% heat capacities of the cells (J/K)\n${n} ${n} ${n}\n${eLines.join('\n')}\n`;
  // Heater zones: the left and right thirds of the plate (by column), power shared by cell area.
  const zones = [(j: number) => j < N / 3, (j: number) => j >= N - N / 3];
  const bLines: string[] = [];
  zones.forEach((inZone, z) => {
    let area = 0;
    for (let i = 0; i < N; i++) for (let j = 0; j < N; j++) if (inZone(j)) area += areaOf(i, j);
    for (let i = 0; i < N; i++) for (let j = 0; j < N; j++) if (inZone(j)) bLines.push(`${id(i, j) + 1} ${z + 1} ${number(areaOf(i, j) / area)}`);
  });
  const B = `%%MatrixMarket matrix coordinate real general\n% heater zones: left, right (share of the zone power per cell)\n${n} 2 ${bLines.length}\n${bLines.join('\n')}\n`;
  const mid = Math.floor(N / 2);
  const sensors = [id(mid, mid), id(mid, Math.floor(N / 6)), id(N - 1, N - 1)];
  const C =
    `%%MatrixMarket matrix coordinate real general\n% thermocouples: centre, left zone, far corner\n3 ${n} 3\n` +
    sensors.map((k, r) => `${r + 1} ${k + 1} 1`).join('\n') +
    '\n';
  return {
    states: n,
    A,
    E,
    B,
    C,
    labels: { inputs: ['left zone power', 'right zone power'], outputs: ['centre thermocouple', 'left-zone thermocouple', 'corner thermocouple'] },
  };
}
