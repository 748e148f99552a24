// Generates psychrometric check vectors for byre from PsychroLib (npm psychrolib 1.1.1, which
// carries PsychroLib 2.5.0: the ASHRAE Handbook - Fundamentals 2017 ch. 1 equations, SI units).
// Run:  npm install && npm run gen   (writes ../../resources/vectors/psychrolib-si.csv)
// Grid: dry bulb -20..50 C in 2.5 K steps x wet-bulb depressions 0..20 K, at sea level and at
// 1500 m (ASHRAE standard-atmosphere station pressure). Points PsychroLib rejects (negative
// humidity ratio) or with RH below 2 % are left out.
// Note: PsychroLib takes saturation over ice at or below 0.01 C, so rh and dew point below
// freezing are with respect to ice (frost point); byre's tests account for that.
'use strict';
const psychrolib = require('psychrolib');
psychrolib.SetUnitSystem(psychrolib.SI);

const depressionsK = [0, 0.5, 1, 2, 3, 4, 6, 8, 10, 12, 15, 18, 20];
const elevationsM = [0, 1500];
const f = (x, d) => Number(x.toFixed(d));
const rows = ['tdb_c,twb_c,elevation_m,pressure_pa,rh_pct,dew_point_c,hum_ratio_kg_kg,enthalpy_j_kg,vap_pres_pa'];
for (const z of elevationsM) {
  const p = psychrolib.GetStandardAtmPressure(z);
  for (let i = 0; i <= 28; i++) {
    const tdb = -20 + 2.5 * i;
    for (const dep of depressionsK) {
      const twb = tdb - dep;
      let w, rh, td, h, pw;
      try {
        w = psychrolib.GetHumRatioFromTWetBulb(tdb, twb, p);
        if (!(w > 0)) continue;
        rh = psychrolib.GetRelHumFromTWetBulb(tdb, twb, p);
        td = psychrolib.GetTDewPointFromTWetBulb(tdb, twb, p);
        h = psychrolib.GetMoistAirEnthalpy(tdb, w);
        pw = psychrolib.GetVapPresFromHumRatio(w, p);
      } catch (e) {
        continue;
      }
      if (rh < 0.02) continue;
      rows.push([f(tdb, 2), f(twb, 2), z, f(p, 3), f(rh * 100, 5), f(td, 5), w.toExponential(9), f(h, 3), f(pw, 5)].join(','));
    }
  }
}
process.stdout.write(rows.join('\n') + '\n');
