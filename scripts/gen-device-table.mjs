// Writes the example's characterisation table (examples/halden180-nlvt.devtable.csv): the
// low-threshold NMOS of the INVENTED Halden 180 process, in qpoint's table format (design §11).
//
// The numbers come from an invented model, richer than the square law so that a table visibly
// differs from it — NOT from any foundry's data or any simulator's model:
//   VT   = VT0 + γ·(√(φ + VSB) − √φ) − η·(Lref/L)·VDS                (body effect, DIBL)
//   qF,R = ln(1 + exp((VGS − VT − {0, n·VDS})/(2·n·U_T)))              (weak ↔ strong inversion)
//   VOV  = 2·n·U_T·qF                                                  (effective overdrive)
//   ID/W = 2·n·(µ0·Cox/L)·U_T²·(qF² − qR²)
//          / (1 + θ·VOV + VOV/(Esat·L))                                (mobility degradation,
//                                                                       velocity saturation)
//          · (1 + λ0·(Lref/L)·VDS)                                     (length modulation)
// Run: node scripts/gen-device-table.mjs [out.csv]
import { writeFileSync } from 'node:fs';

const P = {
  vt0: 0.32, gamma: 0.4, phi: 0.85, eta: 0.03, lref: 0.18e-6, n: 1.32,
  u0cox: 300e-6, theta: 0.9, esat: 6e6, lambda0: 0.1, tC: 27,
};
const UT = (1.380649e-23 * (P.tC + 273.15)) / 1.602176634e-19;

const span = (a, b, n) => Array.from({ length: n }, (_, k) => +(a + ((b - a) * k) / (n - 1)).toFixed(6));
const GRID = {
  l: [0.18e-6, 0.35e-6, 0.5e-6, 1e-6, 2e-6, 4e-6],
  vsb: [0, 0.2, 0.4, 0.6, 0.9],
  vds: span(0, 1.8, 19),
  vgs: span(0, 1.8, 37),
};

const softplus = (x) => (x > 30 ? x : Math.log1p(Math.exp(x)));

function idPerWidth(l, vgs, vds, vsb) {
  const vt = P.vt0 + P.gamma * (Math.sqrt(P.phi + vsb) - Math.sqrt(P.phi)) - P.eta * (P.lref / l) * vds;
  const qf = softplus((vgs - vt) / (2 * P.n * UT));
  const qr = softplus((vgs - vt - P.n * vds) / (2 * P.n * UT));
  const vov = 2 * P.n * UT * qf;
  const core = 2 * P.n * (P.u0cox / l) * UT * UT * (qf * qf - qr * qr);
  return (core / (1 + P.theta * vov + vov / (P.esat * l))) * (1 + P.lambda0 * (P.lref / l) * vds);
}

const out = process.argv[2] ?? new URL('../examples/halden180-nlvt.devtable.csv', import.meta.url);
const lines = [
  '# Halden 180 (an INVENTED process) low-threshold NMOS, 27 °C: id per metre of width (A/m).',
  '# Made by scripts/gen-device-table.mjs from an invented model (velocity saturation, mobility',
  '# degradation, DIBL, body effect): not any foundry\'s data. Columns: l (m), vgs, vds, vsb (V), id.',
  'l,vgs,vds,vsb,id',
];
for (const l of GRID.l) for (const vsb of GRID.vsb) for (const vds of GRID.vds) for (const vgs of GRID.vgs) {
  const id = vds === 0 ? 0 : idPerWidth(l, vgs, vds, vsb);
  lines.push(`${l},${vgs},${vds},${vsb},${id.toPrecision(7)}`);
}
writeFileSync(out, lines.join('\n') + '\n');
console.log(`wrote ${lines.length - 4} rows`);
