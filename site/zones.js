// Simple reductions of one photo's measurements for the comparison table
// and the overlaid field curves: medians over zones of image height and
// over bins along it. Medians resist the odd poorly placed edge. Zones are
// thirds of the distance from the optical centre to the farthest corner:
// centre [0, 1/3), mid-field [1/3, 2/3), corner [2/3, 1].

/** median of the finite values, or NaN. */
export function median(values) {
  const v = values.filter(Number.isFinite).sort((a, b) => a - b);
  if (!v.length) return NaN;
  const m = v.length >> 1;
  return v.length % 2 ? v[m] : (v[m - 1] + v[m]) / 2;
}

export const ZONES = Object.freeze([
  { name: 'centre', lo: 0, hi: 1 / 3 },
  { name: 'mid-field', lo: 1 / 3, hi: 2 / 3 },
  { name: 'corner', lo: 2 / 3, hi: 1.0001 },
]);

/** zoneOf returns the index of the zone of a measurement. */
export function zoneOf(m, r) {
  const t = m.height_mm / r.corner_mm;
  return ZONES.findIndex((z) => t >= z.lo && t < z.hi);
}

/** zoneMedians returns, for frequency index fi, the median MTF in each zone (all orientations). */
export function zoneMedians(r, fi) {
  return ZONES.map((_, zi) => median(r.measurements.filter((m) => zoneOf(m, r) === zi).map((m) => m.mtf_at_freqs[fi])));
}

/**
 * gap is the median sagittal minus the median tangential MTF at frequency
 * index fi, outside the centre zone (where the two directions can differ).
 */
export function gap(r, fi) {
  const out = r.measurements.filter((m) => zoneOf(m, r) > 0);
  const s = median(out.filter((m) => m.orientation === 'sagittal').map((m) => m.mtf_at_freqs[fi]));
  const t = median(out.filter((m) => m.orientation === 'tangential').map((m) => m.mtf_at_freqs[fi]));
  return s - t;
}

/**
 * balance compares the two halves of the frame outside the centre zone:
 * the median MTF at frequency index fi on the left minus on the right, and
 * at the top minus at the bottom (x right, y down, about the optical centre).
 */
export function balance(r, fi) {
  const out = r.measurements.filter((m) => zoneOf(m, r) > 0);
  const [cx, cy] = r.center_px;
  const med = (f) => median(out.filter(f).map((m) => m.mtf_at_freqs[fi]));
  return {
    leftRight: med((m) => m.x_px < cx) - med((m) => m.x_px > cx),
    topBottom: med((m) => m.y_px < cy) - med((m) => m.y_px > cy),
  };
}

/**
 * binned returns points [height mm, median MTF] through n equal bins of
 * height from 0 to the corner, for the measurements that pass keep, at
 * frequency index fi; empty bins are left out.
 */
export function binned(r, fi, keep, n = 6) {
  const out = [];
  for (let b = 0; b < n; b++) {
    const lo = (r.corner_mm * b) / n;
    const hi = (r.corner_mm * (b + 1)) / n;
    const sel = r.measurements.filter((m) => keep(m) && m.height_mm >= lo && (m.height_mm < hi || b === n - 1));
    if (sel.length) out.push([median(sel.map((m) => m.height_mm)), median(sel.map((m) => m.mtf_at_freqs[fi]))]);
  }
  return out;
}
