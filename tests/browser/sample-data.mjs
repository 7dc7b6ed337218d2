// Synthetic plot data for the browser tests: simple smooth shapes with the
// layout of the engine's sweep and output curves. Test data only; not a
// circuit model.
export function sampleSweep() {
  const freq = [];
  for (let i = 0; i <= 160; i++) freq.push(10 ** (0 + i / 20)); // 1 Hz … 100 MHz
  const band = (f, lo, hi) => 1 / Math.sqrt((1 + (lo / f) ** 2) * (1 + (f / hi) ** 2));
  const db = (x) => 20 * Math.log10(x);
  return {
    freq,
    voltage_gain_db: freq.map((f) => db(14.2 * band(f, 62.5, 2.35e6))),
    current_gain_db: freq.map((f) => db(5.1 * band(f, 40, 5e6))),
    power_gain_db: freq.map((f) => 18.6 + 2 * db(band(f, 50, 3e6))),
    phase_deg: freq.map((f) => 180 - (Math.atan(f / 2.35e6) - Math.atan(62.5 / f)) * 57.29578 - 180),
    input_impedance: freq.map((f) => 2950 * Math.sqrt(1 + (12 / f) ** 2) / Math.sqrt(1 + (f / 8e6) ** 2)),
    output_impedance: freq.map((f) => 3680 / Math.sqrt(1 + (f / 3e7) ** 2)),
  };
}

export function sampleCurves() {
  const characteristics = [];
  for (let k = 1; k <= 5; k++) {
    const ib = k * 3e-6;
    const vce = [];
    const ic = [];
    for (let i = 0; i <= 60; i++) {
      const v = i * 0.2;
      vce.push(v);
      ic.push(200 * ib * (1 - Math.exp(-v / 0.08)) * (1 + v / 60));
    }
    characteristics.push({ label: `IB ${k * 3} µA`, vce, ic });
  }
  return {
    characteristics,
    dc_load_line: { vce: [0, 12], ic: [12 / 5000, 0] },
    ac_load_line: { vce: [0, 4.62 + 0.00151 * 2810], ic: [0.00151 + 4.62 / 2810, 0] },
    quiescent: { vce: 4.62, ic: 0.00151 },
    swing_limits: [
      { label: "clips", vce: 0.35, ic: 0.00303 },
      { label: "cuts off", vce: 8.86, ic: 0.0 },
    ],
  };
}
