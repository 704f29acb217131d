/**
 * Every default and tolerance of qpoint in one place. Doc comments elsewhere refer here, so the
 * documentation cannot drift from the code.
 */
export const DEFAULTS = {
  /** K, nominal temperature when `process.tnom` is absent (27 °C). */
  tnom: 300.15,
  model: 'square-law' as const,
  /** V, limits.margin. */
  margin: 0.1,
  /** relative, limits.error. */
  error: 0.01,
  /** V, limits.sourceHeadroom: what an input current source needs across it. */
  sourceHeadroom: 0.2,
  /** relative, limits.tolerance: total ratio deviation one Monte Carlo sample may show. */
  tolerance: 0.05,
  vss: 0,
  /** Device parameters not given in the spec. */
  device: { lambda: 0, gamma: 0, phi: 0.7, n: 1.3, tcv: 0, bex: -1.5, gn: 2 / 3 },
  /** `analysis.noise`: the density is read at f (Hz) and integrated over band (Hz). */
  noise: { f: 1e3, band: [1, 1e6] as [number, number] },
  /** Bipolar parameters not given in the spec (design §10). */
  bipolar: { br: 1, eg: 1.11, xti: 3, xtb: 0, vcesat: 0.2 },
  /** Emitter-area multiple of a bipolar device. */
  area: 1,
  /** m parallel count of a device. */
  m: 1,
  /** relative: a start-up element counts as off at the operating point below this fraction of
   *  the smallest branch current of its loop (design §14). */
  startupLimit: 0.01,
} as const;

/** Limits that keep reading an untrusted spec fast and bounded (design §2, spec findings). */
export const SPEC_LIMITS = {
  /**
   * characters (512 KiB, ~3 500 block-style or ~5 000 one-line mirrors); larger files get a
   * `too-large` finding instead of a parse. Reading a file this size takes ~0.15–0.35 s here and
   * its whole analysis ~0.4–0.6 s (scripts/bench.ts prints both).
   */
  maxChars: 524_288,
  /** `[` / `{` nesting refused before parsing (a spec needs ~4; the YAML parser gives up near 900, slowly). */
  maxFlowDepth: 500,
  /** aliases expanded when converting the YAML to data (guards against alias bombs). */
  maxAliasCount: 1000,
  /** characters in one expression. */
  maxExpressionLength: 1000,
  /** YAML syntax findings reported per file; the rest are counted in the last one. */
  maxSyntaxFindings: 20,
  /** spec findings listed per code; the rest are counted in one `more-findings` per code. */
  maxFindingsPerCode: 100,
  /** Elements (devices, sources, resistors) of one netlist mirror; a larger netlist gets a
   *  `netlist-too-large` finding instead of a solve (its analysis would take seconds). */
  maxNetlistElements: 5000,
} as const;

/**
 * Monte Carlo samples per output, as the editor's `qpoint.monteCarlo.samples` bounds them
 * (package.json says the same) and the CLI's `--mc` accepts: each sample re-solves a mirror, and
 * the draws are held in typed arrays, so an unbounded count is minutes of work or a failed allocation.
 */
export const MC_SAMPLES = { min: 10, max: 10_000_000, default: 10_000 } as const;

/** Provisional size of an `auto` dimension until the sizing pass runs (design §2 auto sizing). */
export const PROVISIONAL_SIZE = {
  /** m, when neither the process `lref` nor the spec gives a length. */
  l: 1e-6,
  /** w = wOverL·l, but at least the process `wmin`. */
  wOverL: 10,
} as const;

export const SOLVER = {
  /** S, conductance across every channel and from every node to the rails' midpoint. */
  gmin: 1e-12,
  /** S, what is left of gmin when a converged point is polished (where gmin could show in a
   *  figure): small enough to vanish from nanoampere figures, not zero, so a node that only
   *  gates devices keeps its place. */
  gminFinal: 1e-18,
  /** Unknown node voltages up to which the Jacobian is factored dense (every template
   *  circuit); larger circuits are factored sparse in a fill-reducing order. */
  denseMaxNodes: 40,
  /** Multiply-adds of one sparse factorization (from the symbolic elimination) beyond which a
   *  circuit is refused as too densely connected: a few milliseconds per Newton iteration. */
  maxFactorWork: 2e6,
  /** Newton iterations per attempt. */
  maxIterations: 200,
  /** V, largest node-voltage step of one Newton iteration. */
  maxStep: 0.3,
  /** A, residual current tolerance (KCL). */
  absTol: 1e-13,
  /** relative tolerance on the voltage update. */
  relTol: 1e-9,
  /** V, absolute tolerance on the voltage update. */
  vTol: 1e-9,
  /** Source-stepping: number of ramp steps tried when plain Newton fails. */
  sourceSteps: 20,
  /** ms, wall-clock budget of one DC solve including every retry. */
  timeBudgetMs: 50,
  /** V, compliance search accuracy. */
  complianceTol: 1e-4,
} as const;

/** Drift and noise analyses (analysis/drift.ts, analysis/noise.ts). */
export const DRIFT = {
  /** K, half-step of the central difference that gives each element's ∂current/∂T. */
  dT: 0.05,
  /** Temperatures re-solved across process.trange (ends included) for tcBox and its plot. */
  trangePoints: 11,
  /** Frequencies per decade of the noise spectrum drawn in plots. */
  spectrumPerDecade: 10,
  /** Frequencies per decade of the band integral when a filter makes the transfer frequency
   *  dependent (trapezoids in ln f; without a capacitor the integral is exact). */
  integralPerDecade: 40,
} as const;

/** Exact SI defining constants (SI Brochure, 9th ed., 2019). */
export const BOLTZMANN = 1.380649e-23;      // J/K
export const ELEMENTARY_CHARGE = 1.602176634e-19; // C
export const ZERO_CELSIUS = 273.15;          // K
