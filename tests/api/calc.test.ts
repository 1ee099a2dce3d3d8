/**
 * Calculator endpoints through the running app: each happy path against a
 * published formula or a hand computation named beside the expected value, and bad input →
 * a 4xx problem with a clear message (never a 500).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { api, base, signIn, type Session } from '../support/http.ts';

let viewer: Session;
let operator: Session;

beforeAll(async () => {
  viewer = await signIn('viewer');
  operator = await signIn('operator');
});

const post = (path: string, json: unknown, session: Session = viewer) =>
  api(`/api/v1/calc/${path}`, { method: 'POST', session, json });

function expectProblem(r: { status: number; headers: Headers; body: any }, status: number, path?: string) {
  expect(r.status).toBe(status);
  expect(r.headers.get('content-type')).toContain('application/problem+json');
  if (path) expect(r.body.errors.map((e: any) => e.path)).toContain(path);
}

describe('POST /api/v1/calc/dip-thickness', () => {
  it('continuous drag-out model (Landau–Levich limit at this Ca)', async () => {
    const r = await post('dip-thickness', {
      viscosityMPaS: 10,
      speedMmS: 2,
      surfaceTensionMNm: 25,
      densityKgM3: 950,
      solidsVolumeFraction: 0.3,
    });
    expect(r.status).toBe(200);
    // hand-computed: Ca = ηU/γ = 0.010·0.002/0.025 = 8.0e-4
    expect(r.body.capillaryNumber).toBeCloseTo(8.0e-4, 10);
    // hand-computed: ℓc = √(γ/(ρg)) = √(0.025/(950·9.80665)) = 1.63813 mm
    expect(r.body.capillaryLengthMm).toBeCloseTo(1.63813, 4);
    // N/(1 − N²)^(2/3) = 0.94·Ca^(1/6), h = N·√(ηU/(ρg)) solved by bisection in Python: 12.6067 µm
    // (pure Landau–Levich 0.94·ℓc·Ca^(2/3) = 13.2699 µm); dry = 0.3·h = 3.7820 µm (Brinker & Scherer ch. 13)
    expect(r.body.wetThicknessUm).toBeCloseTo(12.6067, 3);
    expect(r.body.dryThicknessUm).toBeCloseTo(3.782, 3);
    expect(r.body.regime).toBe('landau-levich');
  });

  it('negative viscosity and zero speed → 400 with the field paths', async () => {
    const neg = await post('dip-thickness', { viscosityMPaS: -1, speedMmS: 2, surfaceTensionMNm: 25, densityKgM3: 950 });
    expectProblem(neg, 400, 'viscosityMPaS');
    expect(neg.body.detail).toMatch(/viscosityMPaS must be greater than 0/);
    const zero = await post('dip-thickness', { viscosityMPaS: 10, speedMmS: 0, surfaceTensionMNm: 25, densityKgM3: 950 });
    expectProblem(zero, 400, 'speedMmS');
    const text = await post('dip-thickness', { viscosityMPaS: 'ten', speedMmS: 2, surfaceTensionMNm: 25, densityKgM3: 950 });
    expectProblem(text, 400, 'viscosityMPaS');
  });
});

describe('POST /api/v1/calc/viscosity-cup', () => {
  it('Zahn 1 at 40 s: ν = 1.1(t − 29) = 12.1 mm²/s (ASTM D4212); η = ν·ρ', async () => {
    const r = await post('viscosity-cup', { cup: 'zahn-1', seconds: 40, densityGCm3: 0.95 });
    expect(r.status).toBe(200);
    expect(r.body.inRange).toBe(true);
    expect(r.body.kinematicMm2S).toBeCloseTo(12.1, 10);
    // hand-computed: 12.1 mm²/s × 0.95 g/cm³ = 11.495 mPa·s
    expect(r.body.dynamicMPaS).toBeCloseTo(11.495, 10);
  });

  it('outside the cup’s window: inRange false, no viscosity, "out of range — use another cup"', async () => {
    const r = await post('viscosity-cup', { cup: 'zahn-1', seconds: 30 });
    expect(r.status).toBe(200);
    expect(r.body.inRange).toBe(false);
    expect(r.body.kinematicMm2S).toBeUndefined();
    expect(r.body.message).toMatch(/out of range — use another cup/);
  });

  it('an unknown cup → 400', async () => {
    expectProblem(await post('viscosity-cup', { cup: 'zahn-9', seconds: 30 }), 400, 'cup');
  });
  it('takes the lab’s own cup constants (A·t − B/t) in place of the table’s', async () => {
    // hand-computed: 1.40·50 − 210/50 = 65.8 mm²/s
    const r = await post('viscosity-cup', { cup: 'iso-4mm', seconds: 50, equation: { kind: 'a-b/t', a: 1.4, b: 210 } });
    expect(r.status).toBe(200);
    expect(r.body.kinematicMm2S).toBeCloseTo(65.8, 10);
    expectProblem(
      await post('viscosity-cup', { cup: 'iso-4mm', seconds: 50, equation: { kind: 'a-b/t', a: -1, b: 210 } }),
      400,
      'equation.a',
    );
  });
});

describe('POST /api/v1/calc/cure-equivalent', () => {
  it('60 min at 120 °C is 109.20 equivalent minutes at 110 °C with Ea 75 kJ/mol (ASTM C1074 equivalent age)', async () => {
    const r = await post('cure-equivalent', {
      profile: [
        { minutes: 0, tempC: 120 },
        { minutes: 60, tempC: 120 },
      ],
      activationEnergyKJMol: 75,
      referenceC: 110,
    });
    expect(r.status).toBe(200);
    // hand-computed: 60·exp(−(75000/8.314462618)·(1/393.15 − 1/383.15)) = 109.1988 min
    expect(r.body.equivalentMinutes).toBeCloseTo(109.1988, 3);
  });

  it('time at or above a threshold interpolates the ramp crossings', async () => {
    const profile = [
      { minutes: 0, tempC: 20 },
      { minutes: 20, tempC: 120 },
      { minutes: 80, tempC: 120 },
      { minutes: 100, tempC: 20 },
    ];
    const r = await post('cure-equivalent', { profile, activationEnergyKJMol: 75, referenceC: 110, thresholdC: 100 });
    // hand-computed: ramp 20·(120−100)/100 = 4 min + soak 60 min + cool 4 min = 68 min
    expect(r.body.minutesAtOrAbove).toBeCloseTo(68, 10);
  });

  it('decreasing minutes → 400 at the offending point', async () => {
    const r = await post('cure-equivalent', {
      profile: [
        { minutes: 10, tempC: 100 },
        { minutes: 5, tempC: 100 },
      ],
      activationEnergyKJMol: 75,
      referenceC: 110,
    });
    expectProblem(r, 400, 'profile.1.minutes');
  });
});

describe('POST /api/v1/calc/fringe-thickness', () => {
  it('adjacent maxima at 600 and 500 nm, n = 1.5 → d = λ1λ2/(2n(λ1 − λ2)) = 1000 nm (thin-film interference, Macleod)', async () => {
    const r = await post('fringe-thickness', { lambda1Nm: 600, lambda2Nm: 500, refractiveIndex: 1.5 });
    expect(r.status).toBe(200);
    expect(r.body.thicknessNm).toBeCloseTo(1000, 10);
  });

  it('lambda2 ≥ lambda1 → 400 naming lambda2Nm', async () => {
    const r = await post('fringe-thickness', { lambda1Nm: 500, lambda2Nm: 500, refractiveIndex: 1.5 });
    expectProblem(r, 400, 'lambda2Nm');
    expect(r.body.detail).toMatch(/lambda1Nm must be greater than lambda2Nm/);
  });
});

/** R(λ) = 0.04 + 0.02·cos(4π·n·d/λ): extrema where 2nd = mλ (thin-film interference at normal incidence). */
function fringeCsv(dNm: number, n: number, header = true): string {
  const rows: string[] = header ? ['wavelength_nm,reflectance'] : [];
  for (let l = 450; l <= 900; l++) rows.push(`${l},${(0.04 + 0.02 * Math.cos((4 * Math.PI * n * dNm) / l)).toFixed(6)}`);
  return rows.join('\n') + '\n';
}

async function upload(body: BodyInit, contentType?: string, query = '') {
  const session = operator;
  // As a browser sends it (Astro's origin check refuses multipart posts without a same-origin Origin).
  const headers: Record<string, string> = { cookie: session.cookie, origin: base() };
  if (contentType) headers['content-type'] = contentType;
  const r = await fetch(`${base()}/api/v1/calc/fringe-thickness/spectrum${query}`, { method: 'POST', headers, body });
  const text = await r.text();
  return { status: r.status, headers: r.headers, body: text ? JSON.parse(text) : null };
}

function form(content: BlobPart, name = 'spectrum.csv', type = 'text/csv', refractiveIndex = '1.5'): FormData {
  const f = new FormData();
  f.set('file', new Blob([content], { type }), name);
  f.set('refractiveIndex', refractiveIndex);
  return f;
}

describe('POST /api/v1/calc/fringe-thickness/spectrum', () => {
  it('a synthetic 2000 nm coat (n 1.5) is found within 0.5 % from its fringes (multipart upload)', async () => {
    const r = await upload(form(fringeCsv(2000, 1.5)));
    expect(r.status).toBe(200);
    expect(r.body.measurable).toBe(true);
    // constructed: extrema at λ = 2nd/m exactly, so every adjacent pair gives d = 2000 nm
    expect(Math.abs(r.body.thicknessNm - 2000) / 2000).toBeLessThan(0.005);
    expect(r.body.count).toBeGreaterThanOrEqual(4);
  });

  it('a text/csv body with the index as a query parameter works too', async () => {
    const r = await upload(fringeCsv(2000, 1.5, false), 'text/csv', '?refractiveIndex=1.5');
    expect(r.status).toBe(200);
    expect(Math.abs(r.body.thicknessNm - 2000) / 2000).toBeLessThan(0.005);
  });

  it('a spectrum with no fringes (index-matched coat) → 400 that says so', async () => {
    const flat = [
      'nm,R',
      ...Array.from({ length: 200 }, (_, i) => `${500 + i},${(0.04 + 0.0001 * Math.sin(i)).toFixed(6)}`),
    ].join('\n');
    const r = await upload(form(flat));
    expectProblem(r, 400, 'file');
    expect(r.body.title).toBe('No measurable fringes');
    expect(r.body.detail).toMatch(/fringes too weak/);
  });

  it('a malformed CSV → 400 listing the bad rows by line number', async () => {
    const csv = 'wavelength_nm,reflectance\n500,0.04\nabc,0.05\n502,0.04,7\n503,0.04\n504,0.04\n505,0.04\n';
    const r = await upload(form(csv));
    expectProblem(r, 400, 'file:line 3');
    expect(r.body.errors.map((e: any) => e.path)).toContain('file:line 4');
    expect(r.body.detail).toMatch(/line 3: not a number: "abc"/);
    expect(r.body.detail).toMatch(/line 4: expected 2 columns/);
  });

  it('an upload over 1 MB → 413', async () => {
    const big = '500,0.04\n'.repeat(Math.ceil((1024 * 1024 + 10) / 9));
    const r = await upload(form(big));
    expectProblem(r, 413);
  });

  it('a binary file (a PNG, whatever it is called) → 415', async () => {
    const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52, 0, 0, 0, 1]);
    const r = await upload(form(png, 'spectrum.csv', 'text/csv'));
    expectProblem(r, 415, 'file');
    expect(r.body.detail).toMatch(/binary/);
  });

  it('a missing refractive index → 400; a JSON body → 415', async () => {
    const f = new FormData();
    f.set('file', new Blob([fringeCsv(2000, 1.5)], { type: 'text/csv' }), 's.csv');
    expectProblem(await upload(f), 400, 'refractiveIndex');
    expectProblem(await upload('{}', 'application/json'), 415);
  });
});

describe('POST /api/v1/calc/crosscut', () => {
  it('ISO 2409 Table 1 / ASTM D3359 bands', async () => {
    expect((await post('crosscut', { percentRemoved: 0 })).body).toEqual({ iso2409: 0, astmD3359: '5B' });
    expect((await post('crosscut', { percentRemoved: 3 })).body).toEqual({ iso2409: 1, astmD3359: '4B' });
    expect((await post('crosscut', { percentRemoved: 20 })).body).toEqual({ iso2409: 3, astmD3359: '2B' });
    expectProblem(await post('crosscut', { percentRemoved: 101 }), 400, 'percentRemoved');
  });
});

describe('POST /api/v1/calc/uniformity', () => {
  it('hottest +3.0 °C and coldest −2.5 °C at setpoint 110 °C → class 1 (±3 °C, AMS2750F)', async () => {
    const r = await post('uniformity', {
      setpointC: 110,
      sensors: [
        { name: 'TC1', readingsC: [112, 113] },
        { name: 'TC2', readingsC: [108, 107.5] },
      ],
    });
    expect(r.status).toBe(200);
    // hand-computed: 113 − 110 = +3.0; 107.5 − 110 = −2.5
    expect(r.body).toMatchObject({ hottestDeviationC: 3, coldestDeviationC: -2.5, uniformityClass: 1 });
    expectProblem(await post('uniformity', { setpointC: 110, sensors: [] }), 400, 'sensors');
  });
});

describe('POST /api/v1/calc/speed-advisor', () => {
  it('calibrated h = C(ηU)^(2/3) inverted: U = (h/C)^(3/2)/η', async () => {
    const r = await post('speed-advisor', { viscosityMPaS: 10, targetDryThicknessUm: 2, thicknessConstant: 0.3 });
    expect(r.status).toBe(200);
    // hand-computed: (2/0.3)^1.5 / 10 = 1.72133 mm/s
    expect(r.body.speedMmS).toBeCloseTo(1.72133, 4);
    expect(r.body.model).toBe('calibrated');
  });

  it('both targets → 400', async () => {
    expectProblem(
      await post('speed-advisor', {
        viscosityMPaS: 10,
        targetDryThicknessUm: 2,
        targetWetThicknessUm: 6,
        thicknessConstant: 0.3,
      }),
      400,
      'targetDryThicknessUm',
    );
  });
});

describe('POST /api/v1/calc/calibration', () => {
  it('points made from C = 0.3 exactly give C = 0.3, exponent 2/3 and r² = 1 (least squares in log space)', async () => {
    // hand-computed: h = 0.3·(ηU)^(2/3) at (10, 2), (12, 1.8), (8, 2.2), (15, 1.5)
    const points = [
      { viscosityMPaS: 10, speedMmS: 2, thicknessUm: 2.2104188991842317 },
      { viscosityMPaS: 12, speedMmS: 1.8, thicknessUm: 2.3267894652344343 },
      { viscosityMPaS: 8, speedMmS: 2.2, thicknessUm: 2.029845733947581 },
      { viscosityMPaS: 15, speedMmS: 1.5, thicknessUm: 2.3909817806608746 },
    ];
    const r = await post('calibration', { points });
    expect(r.status).toBe(200);
    expect(r.body.fixedExponent.constant).toBeCloseTo(0.3, 10);
    expect(r.body.fixedExponent.rSquared).toBeCloseTo(1, 10);
    expect(r.body.freeExponent.exponent).toBeCloseTo(2 / 3, 8);
    expectProblem(await post('calibration', { points: points.slice(0, 1) }), 400, 'points');
  });
});

describe('POST /api/v1/calc/bath-addition', () => {
  it('solvent and fresh lacquer by solids mass balance, with the caution', async () => {
    const s = await post('bath-addition', { bathMassKg: 38, solidsNowPct: 31, solidsTargetPct: 30 });
    expect(s.status).toBe(200);
    // hand-computed: m = 38·(31/30 − 1) = 1.26667 kg solvent
    expect(s.body).toMatchObject({ ok: true, kind: 'solvent' });
    expect(s.body.massKg).toBeCloseTo(1.26667, 4);
    expect(s.body.caution).toMatch(/flammable/);
    const l = await post('bath-addition', { bathMassKg: 38, solidsNowPct: 29, solidsTargetPct: 30, lacquerSolidsPct: 32 });
    // hand-computed: m = 38·(30 − 29)/(32 − 30) = 19 kg fresh lacquer
    expect(l.body.kind).toBe('lacquer');
    expect(l.body.massKg).toBeCloseTo(19, 10);
  });

  it('an impossible request (lacquer below the target) → 400 with the reason', async () => {
    const r = await post('bath-addition', { bathMassKg: 38, solidsNowPct: 29, solidsTargetPct: 30, lacquerSolidsPct: 28 });
    expectProblem(r, 400, 'lacquerSolidsPct');
    expect(r.body.detail).toMatch(/must be above the target/);
  });
});

describe('POST /api/v1/calc/activation-energy', () => {
  it('60 min at 120 °C ≡ 120 min at 110 °C → Ea = R·ln(tA/tB)/(1/TA − 1/TB) = 86.813 kJ/mol (Arrhenius)', async () => {
    const r = await post('activation-energy', {
      scheduleA: { minutes: 60, tempC: 120 },
      scheduleB: { minutes: 120, tempC: 110 },
    });
    expect(r.status).toBe(200);
    // hand-computed: 8.314462618·ln(0.5)/(1/393.15 − 1/383.15) = 86 813.4 J/mol
    expect(r.body.activationEnergyKJMol).toBeCloseTo(86.8134, 3);
  });

  it('the hotter schedule longer → 400 with the reason', async () => {
    const r = await post('activation-energy', {
      scheduleA: { minutes: 120, tempC: 120 },
      scheduleB: { minutes: 60, tempC: 110 },
    });
    expectProblem(r, 400, 'scheduleB.minutes');
    expect(r.body.detail).toMatch(/hotter schedule must be the shorter/);
  });
});

describe('POST /api/v1/calc/abrasion', () => {
  it('Bayer ratio = reference gain ÷ test gain (ASTM F735): 20 / 5 = 4, premium', async () => {
    const r = await post('abrasion', { referenceHazeGainPct: 20, testHazeGainPct: 5 });
    expect(r.body).toEqual({ bayerRatio: 4, premium: true });
  });
});

describe('calculators need a signed-in user', () => {
  it('anonymous → 401', async () => {
    const r = await api('/api/v1/calc/crosscut', { method: 'POST', json: { percentRemoved: 1 } });
    expectProblem(r, 401);
  });
});
