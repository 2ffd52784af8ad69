// The demo models of Quillmere Kilnworks, an invented firm that builds kilns and thermal test rigs. All
// numbers are invented for the demo; they are chosen to look like what such a firm's engineers would
// upload, not taken from any real product. Generated deterministically (no randomness beyond a fixed-seed
// generator), so every `npm start` seeds the same files and the same checksums.
//
//   kilnWallNetwork   stiff thermal RC network of a kiln wall: heating-element sheath, hot-face brick,
//                     insulating firebrick, ceramic fibre and steel casing, in zones up the wall. Node
//                     temperatures obey C dT/dt = −G T + P (lumped thermal network, e.g. Incropera et al.,
//                     "Fundamentals of Heat and Mass Transfer", 6th ed. 2007, §5.10), so A = −C⁻¹G: real,
//                     stable poles from the sheath's fraction of a second to the brick's hours.
//   rigFrameStructure lightly damped axial model of a test-rig frame floating on its transport air bearings:
//                     a free–free chain of masses and springs (one rigid-body mode, a double pole at 0) with
//                     light stiffness-proportional damping D = βK (Rayleigh damping; e.g. Craig & Kurdila,
//                     "Fundamentals of Structural Dynamics", 2nd ed. 2006, §10.5).
//   burnerPlant       small MIMO plant of a gas burner's air/fuel train: gas valve and air damper in; flame
//                     temperature, flue O₂ and chamber pressure out. A stable random state-space model with
//                     a few lightly damped pairs, fixed seed.
export interface DenseModel {
  A: number[][];
  B: number[][];
  C: number[][];
  D: number[][];
  labels: { inputs: string[]; outputs: string[] };
}

const zerosRows = (r: number, c: number) => Array.from({ length: r }, () => new Array<number>(c).fill(0));

/** Matrix Market coordinate text of a dense matrix, writing only its nonzeros (NISTIR 5935, 1996). */
export function matrixMarketCoordinate(m: number[][], comment: string): string {
  const lines: string[] = [];
  let nnz = 0;
  m.forEach((row, i) =>
    row.forEach((v, j) => {
      if (v !== 0) {
        lines.push(`${i + 1} ${j + 1} ${v.toPrecision(17)}`);
        nnz++;
      }
    }),
  );
  const cols = m[0]?.length ?? 0;
  return `%%MatrixMarket matrix coordinate real general\n% ${comment}\n${m.length} ${cols} ${nnz}\n${lines.join('\n')}\n`;
}

export function csvOf(m: number[][]): string {
  return m.map((row) => row.map((v) => v.toPrecision(17)).join(',')).join('\n') + '\n';
}

interface Layer {
  name: string;
  /** fraction of the wall's nodes through the thickness */
  share: number;
  /** heat capacity of one node, J/K */
  capacity: number;
  /** conductance to the next node through the thickness, W/K */
  conductance: number;
}

// Per node of one zone: capacity and conductance of the slice of material it stands for (invented values of
// the right order for a 1 m² wall slice of a small electric kiln).
const WALL_LAYERS: readonly Layer[] = [
  { name: 'element sheath', share: 0.03, capacity: 25, conductance: 400 },
  { name: 'hot-face brick', share: 0.42, capacity: 4.0e3, conductance: 60 },
  { name: 'insulating firebrick', share: 0.3, capacity: 1.5e3, conductance: 60 },
  { name: 'ceramic fibre', share: 0.2, capacity: 2.0e2, conductance: 40 },
  { name: 'steel casing', share: 0.05, capacity: 1.5e3, conductance: 900 },
];

/**
 * The kiln wall: `zones` zones up the wall, `layers` nodes through the thickness (states = zones·layers).
 * Inputs: upper and lower heater zone power (W). Outputs: the upper and lower control thermocouples (in the
 * hot face, K above ambient) and the casing temperature the safety monitor reads.
 */
export function kilnWallNetwork(layersThrough = 30, zones = 20): DenseModel {
  const n = layersThrough * zones;
  const layerOf: Layer[] = [];
  let acc = 0;
  for (const layer of WALL_LAYERS) {
    const count = Math.max(1, Math.round(layer.share * layersThrough));
    for (let k = 0; k < count && layerOf.length < layersThrough; k++) layerOf.push(layer);
    acc += count;
  }
  while (layerOf.length < layersThrough) layerOf.push(WALL_LAYERS[WALL_LAYERS.length - 1]);
  void acc;
  const node = (i: number, z: number) => z * layersThrough + i;
  const G = zerosRows(n, n);
  const link = (a: number, b: number, g: number) => {
    G[a][a] += g;
    G[b][b] += g;
    G[a][b] -= g;
    G[b][a] -= g;
  };
  for (let z = 0; z < zones; z++) {
    for (let i = 0; i + 1 < layersThrough; i++) {
      // series conductance of the two half-slices
      const g = 1 / (1 / layerOf[i].conductance + 1 / layerOf[i + 1].conductance);
      link(node(i, z), node(i + 1, z), g);
    }
    // the casing loses heat to the hall by convection (≈ 8 W/(m²K) on a zone's share)
    G[node(layersThrough - 1, z)][node(layersThrough - 1, z)] += 8;
    // the element chamber's air couples the sheath to the zone's hot face and the load weakly
    G[node(0, z)][node(0, z)] += 0.5;
  }
  // along the wall: heat spreads between zones in each layer (a tenth of the through-thickness path)
  for (let z = 0; z + 1 < zones; z++) {
    for (let i = 0; i < layersThrough; i++) link(node(i, z), node(i, z + 1), 0.1 * layerOf[i].conductance);
  }
  const A = zerosRows(n, n);
  for (let r = 0; r < n; r++) {
    const cap = layerOf[r % layersThrough].capacity;
    for (let c = 0; c < n; c++) if (G[r][c] !== 0) A[r][c] = -G[r][c] / cap;
  }
  const B = zerosRows(n, 2);
  for (let z = 0; z < zones; z++) B[node(0, z)][z < zones / 2 ? 1 : 0] = 1 / layerOf[0].capacity;
  const C = zerosRows(3, n);
  const hotFace = Math.min(layersThrough - 1, Math.max(1, Math.round(0.06 * layersThrough)));
  C[0][node(hotFace, Math.floor((3 * zones) / 4))] = 1;
  C[1][node(hotFace, Math.floor(zones / 4))] = 1;
  C[2][node(layersThrough - 1, Math.floor(zones / 2))] = 1;
  return {
    A,
    B,
    C,
    D: zerosRows(3, 2),
    labels: {
      inputs: ['upper heater power', 'lower heater power'],
      outputs: ['upper thermocouple', 'lower thermocouple', 'casing temperature'],
    },
  };
}

/** Deterministic generator (mulberry32, a common 32-bit mixing generator), so the seed never changes. */
function random(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export interface SecondOrderDocument {
  form: 'second-order';
  mass: number[][];
  damping: number[][];
  stiffness: number[][];
  force: number[][];
  displacementOutput: number[][];
  velocityOutput: number[][];
  labels: { inputs: string[]; outputs: string[] };
  timeBase: string;
}

/**
 * The rig frame: `dofs` lumped masses along the frame (states = 2·dofs), springs between neighbours and no
 * spring to ground (it floats on air bearings): one rigid-body mode. Inputs: the shaker force at the
 * drive end and the damper actuator at mid-length (N). Outputs: tip displacement (m) and mid-length
 * velocity (m/s).
 */
export function rigFrameStructure(dofs = 150): SecondOrderDocument {
  const rand = random(1707);
  const mass = zerosRows(dofs, dofs);
  const stiffness = zerosRows(dofs, dofs);
  for (let i = 0; i < dofs; i++) mass[i][i] = 4 + 2 * rand() + (i % 25 === 0 ? 30 : 0); // stiffener plates every 25 bays
  for (let i = 0; i + 1 < dofs; i++) {
    const k = 2.0e7 * (0.8 + 0.4 * rand());
    stiffness[i][i] += k;
    stiffness[i + 1][i + 1] += k;
    stiffness[i][i + 1] -= k;
    stiffness[i + 1][i] -= k;
  }
  // β = 2ζ/ω chosen so the first flexible mode (near 40 rad/s here) is damped at about half a percent; the
  // damping ratio grows with frequency (ζ = βω/2), so the highest modes are well damped.
  const beta = 2.5e-4;
  const damping = stiffness.map((row) => row.map((v) => beta * v));
  const force = zerosRows(dofs, 2);
  force[0][0] = 1;
  force[Math.floor(dofs / 2)][1] = 1;
  const displacementOutput = zerosRows(2, dofs);
  displacementOutput[0][dofs - 1] = 1;
  const velocityOutput = zerosRows(2, dofs);
  velocityOutput[1][Math.floor(dofs / 2)] = 1;
  return {
    form: 'second-order',
    mass,
    damping,
    stiffness,
    force,
    displacementOutput,
    velocityOutput,
    labels: {
      inputs: ['shaker force', 'damper actuator force'],
      outputs: ['tip displacement', 'mid-length velocity'],
    },
    timeBase: 's',
  };
}

/**
 * The burner's air/fuel train: `states` states (pairs of lightly damped poles from the air duct's
 * resonances, real poles from the valve and the flame), 2 inputs, 3 outputs. Built in modal coordinates
 * and mixed by a fixed random similarity, so A is dense like an identified model.
 */
export function burnerPlant(states = 12): DenseModel {
  const rand = random(2112);
  const n = states;
  const Am = zerosRows(n, n);
  let k = 0;
  const pairs = Math.floor(n / 3);
  for (let p = 0; p < pairs && k + 1 < n; p++, k += 2) {
    const wn = 3 + 25 * p + 5 * rand();
    const zeta = 0.03 + 0.05 * rand();
    Am[k][k] = -zeta * wn;
    Am[k][k + 1] = wn * Math.sqrt(1 - zeta * zeta);
    Am[k + 1][k] = -wn * Math.sqrt(1 - zeta * zeta);
    Am[k + 1][k + 1] = -zeta * wn;
  }
  for (; k < n; k++) Am[k][k] = -(0.2 + 40 * rand() ** 2);
  // T = I + 0.3·R keeps the similarity well conditioned; A = T Am T⁻¹ is computed as the solution of A T = T Am.
  const T = zerosRows(n, n).map((row, i) => row.map((_, j) => (i === j ? 1 : 0) + 0.3 * (rand() - 0.5)));
  const TAm = T.map((row) => Am[0].map((_, j) => row.reduce((s, t, l) => s + t * Am[l][j], 0)));
  const A = solveRight(TAm, T);
  const B = zerosRows(n, 2).map((row) => row.map(() => rand() - 0.5));
  const C = zerosRows(3, n).map((row) => row.map(() => rand() - 0.5));
  const D = zerosRows(3, 2);
  D[2][1] = 0.02; // the damper moves the chamber pressure at once
  return {
    A,
    B,
    C,
    D,
    labels: {
      inputs: ['gas valve', 'air damper'],
      outputs: ['flame temperature', 'flue oxygen', 'chamber pressure'],
    },
  };
}

/** X with X·T = M, by Gauss–Jordan on Tᵀ Xᵀ = Mᵀ with partial pivoting (small n only). */
function solveRight(M: number[][], T: number[][]): number[][] {
  const n = T.length;
  const a = T.map((_, i) => [...T.map((row) => row[i]), ...M.map((row) => row[i])]);
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(a[r][c]) > Math.abs(a[p][c])) p = r;
    [a[c], a[p]] = [a[p], a[c]];
    for (let r = 0; r < n; r++) {
      if (r === c) continue;
      const f = a[r][c] / a[c][c];
      for (let j = c; j < 2 * n; j++) a[r][j] -= f * a[c][j];
    }
  }
  // row i of a holds (Tᵀ) row i reduced; Xᵀ[i][j] = a[i][n + j] / a[i][i]
  const Xt = a.map((row, i) => row.slice(n).map((v) => v / row[i]));
  return Xt[0].map((_, i) => Xt.map((row) => row[i]));
}
