// The measuring settings as the user sets them, and as the core takes them
// (the JSON of analyze.Settings, plus "fallback_sensor_mm", see wasm/main.go).

const $ = (id) => document.getElementById(id);

function radio(name) {
  const r = document.querySelector(`input[name="${name}"]:checked`);
  return r ? r.value : '';
}

function pair(text) {
  return text.split('x').map(Number);
}

/** readSettings returns the settings for the core from the form. */
export function readSettings() {
  const s = {};
  const mode = radio('pitch-mode');
  const sensor = pair($('sensor-select').value);
  if (mode === 'um') {
    const v = parseFloat($('pitch-um').value);
    if (v > 0) s.pitch_um = v;
  } else if (mode === 'sensor') {
    s.sensor_mm = sensor;
  } else {
    s.fallback_sensor_mm = sensor;
  }
  if (radio('centre-mode') === 'custom') {
    const x = parseFloat($('centre-x').value);
    const y = parseFloat($('centre-y').value);
    if (Number.isFinite(x) && Number.isFinite(y)) s.center_px = [x, y];
  }
  const tone = $('tone').value;
  if (tone === 'gamma') s.tone = 'gamma:' + (parseFloat($('gamma').value) || 2.2);
  else if (tone) s.tone = tone;
  s.method = $('method').value;
  const f1 = parseFloat($('freq-1').value);
  const f2 = parseFloat($('freq-2').value);
  s.freqs_lp_mm = [f1 > 0 ? f1 : 10, f2 > 0 ? f2 : 30];
  return s;
}

/** settingsKey identifies settings, to tell when photos need measuring again. */
export function settingsKey(s) {
  return JSON.stringify(s);
}

/**
 * watchSettings calls hooks.analysis() when a setting that changes the
 * measurement changes, and hooks.units(unit) when the units change.
 */
export function watchSettings(hooks) {
  const analysisIds = ['sensor-select', 'pitch-um', 'centre-x', 'centre-y', 'tone', 'gamma', 'method', 'freq-1', 'freq-2'];
  for (const id of analysisIds) $(id).addEventListener('change', hooks.analysis);
  for (const r of document.querySelectorAll('input[name="pitch-mode"], input[name="centre-mode"]')) r.addEventListener('change', hooks.analysis);
  // Typing a pitch or a centre chooses that option.
  $('pitch-um').addEventListener('input', () => (document.querySelector('input[name="pitch-mode"][value="um"]').checked = true));
  for (const id of ['centre-x', 'centre-y']) $(id).addEventListener('input', () => (document.querySelector('input[name="centre-mode"][value="custom"]').checked = true));
  $('tone').addEventListener('change', () => ($('gamma-row').hidden = $('tone').value !== 'gamma'));
  $('units').addEventListener('change', () => hooks.units($('units').value));
}

/** settingsSummary says in words what a photo was measured with. */
export function settingsSummary(r) {
  const c = r.center_px.map((v) => v.toFixed(1)).join(', ');
  return `Pixel pitch ${+r.pitch_um.toFixed(3)} µm (${r.pitch_source}); optical centre at ${c} px; ` +
    `field frequencies ${r.freqs_lp_mm.join(' and ')} lp/mm; tone ${r.tone} (${r.tone_source}); ` +
    `estimator: ${r.method === 'iso' ? 'ISO 12233' : r.method}.`;
}
