// Decodes NMEA 0183 lines (one per line of the file argv[2]) with two independent parsers from the
// npm registry and prints one JSON object per line:
//   @signalk/nmea0183-signalk 3.20.1 (XTE, APB, RMB -> Signal K values, SI units; checksum checked)
//   nmea-simple 3.3.0 (APB; checksum checked)
// Used by tests/helm/test_helm_wire.cpp. Void sentences (status V) are reported as errors by
// the Signal K parser; that is recorded, not hidden.
const fs = require('fs');
const SignalK = require('@signalk/nmea0183-signalk');
const simple = require('nmea-simple');
const sk = new SignalK({ validateChecksum: true });
for (const line of fs.readFileSync(process.argv[2], 'utf8').split(/\r?\n/)) {
  if (!line) continue;
  const out = { line };
  try {
    const delta = sk.parse(line);
    out.sk = {};
    if (delta) for (const v of delta.updates[0].values) out.sk[v.path] = v.value;
  } catch (e) {
    out.sk_error = String(e.message);
  }
  if (line.slice(3, 6) === 'APB') {
    try {
      const p = simple.parseNmeaSentence(line);
      out.simple = { chxOk: p.chxOk, xteMagn: p.xteMagn, steerDir: p.steerDir, waypoint: p.waypoint,
                     bearingOrig2Dest: p.bearingOrig2Dest };
    } catch (e) {
      out.simple_error = String(e.message);
    }
  }
  console.log(JSON.stringify(out));
}
