/**
 * The AR-coating calculators (product.md §6) through the running app: stack reflectance,
 * spectrum colour and colour difference, each against a closed form or published value named
 * beside it, and bad input → a 4xx problem+json with the field path (never a 500).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { api, signIn, type Session } from '../support/http.ts';

let viewer: Session;

beforeAll(async () => {
  viewer = await signIn('viewer');
});

const post = (path: string, json: unknown) => api(`/api/v1/calc/${path}`, { method: 'POST', session: viewer, json });

function expectProblem(r: { status: number; headers: Headers; body: any }, status: number, path?: string) {
  expect(r.status).toBe(status);
  expect(r.headers.get('content-type')).toContain('application/problem+json');
  if (path) expect(r.body.errors.map((e: any) => e.path)).toContain(path);
}

const grid = Array.from({ length: 81 }, (_, i) => 380 + i * 5);

describe('POST /api/v1/calc/stack-reflectance', () => {
  it('uncoated n = 1.5 with the defaults (air, 0°, average, one face): R = ((n−1)/(n+1))² = 4 % (Fresnel)', async () => {
    const r = await post('stack-reflectance', { layers: [], substrateN: 1.5, wavelengthsNm: [550] });
    expect(r.status).toBe(200);
    expect(r.body.reflectancePct[0]).toBeCloseTo(4, 10);
    expect(r.body.transmittancePct[0]).toBeCloseTo(96, 10);
  });

  it('quarter-wave MgF₂-like layer on 1.52 at 550 nm: R = ((1.52 − 1.38²)/(1.52 + 1.38²))² = 1.2601 % (Macleod)', async () => {
    const r = await post('stack-reflectance', {
      layers: [{ n: 1.38, thicknessNm: 550 / (4 * 1.38) }],
      substrateN: 1.52,
      wavelengthsNm: [550],
    });
    expect(r.status).toBe(200);
    expect(r.body.reflectancePct[0]).toBeCloseTo(1.2601, 3);
  });

  it('both faces uncoated: R = 2R₁/(1 + R₁) = 7.6923 % for n = 1.5 (incoherent plate)', async () => {
    const r = await post('stack-reflectance', { layers: [], substrateN: 1.5, wavelengthsNm: [550], bothFaces: true });
    expect(r.body.reflectancePct[0]).toBeCloseTo(800 / 104, 8);
  });

  it('materials from the table, at an angle, s polarisation: R + T = 100 % for a lossless stack', async () => {
    const r = await post('stack-reflectance', {
      layers: [
        { material: 'zro2', thicknessNm: 15 },
        { material: 'sio2', thicknessNm: 32 },
        { material: 'zro2', thicknessNm: 115 },
        { material: 'sio2', thicknessNm: 88 },
      ],
      substrateN: 1.6,
      wavelengthsNm: grid,
      angleDeg: 30,
      polarization: 's',
    });
    expect(r.status).toBe(200);
    expect(r.body.reflectancePct).toHaveLength(81);
    r.body.reflectancePct.forEach((R: number, i: number) => expect(R + r.body.transmittancePct[i]).toBeCloseTo(100, 9));
  });

  it('bad input → 400 problem+json with the field path', async () => {
    expectProblem(
      await post('stack-reflectance', {
        layers: [{ material: 'kryptonite', thicknessNm: 10 }],
        substrateN: 1.5,
        wavelengthsNm: [550],
      }),
      400,
      'layers.0.material',
    );
    expectProblem(
      await post('stack-reflectance', { layers: [], substrateN: 1.5, wavelengthsNm: [500, 600, 550] }),
      400,
      'wavelengthsNm.2',
    );
    expectProblem(
      await post('stack-reflectance', {
        layers: [{ n: 1.4, material: 'sio2', thicknessNm: 10 }],
        substrateN: 1.5,
        wavelengthsNm: [550],
      }),
      400,
      'layers.0.n',
    );
    expectProblem(
      await post('stack-reflectance', { layers: [], substrateN: 1.5, wavelengthsNm: [550], angleDeg: 90 }),
      400,
      'angleDeg',
    );
    const tooMany = Array.from({ length: 51 }, () => ({ n: 1.5, thicknessNm: 10 }));
    expectProblem(await post('stack-reflectance', { layers: tooMany, substrateN: 1.5, wavelengthsNm: [550] }), 400, 'layers');
    const tooLong = Array.from({ length: 2002 }, (_, i) => 300 + i * 0.5);
    expectProblem(await post('stack-reflectance', { layers: [], substrateN: 1.5, wavelengthsNm: tooLong }), 400, 'wavelengthsNm');
  });
});

describe('POST /api/v1/calc/spectrum-colour', () => {
  it('a perfect white: the D65 white point x 0.3127, y 0.3290 (CIE 015:2004), L* 100, ρv 100 %', async () => {
    const r = await post('spectrum-colour', { wavelengthsNm: grid, reflectancePct: grid.map(() => 100) });
    expect(r.status).toBe(200);
    expect(r.body.x).toBeCloseTo(0.3127, 4);
    expect(r.body.y).toBeCloseTo(0.329, 4);
    expect(r.body.L).toBeCloseTo(100, 8);
    expect(r.body.luminousReflectancePct).toBeCloseTo(100, 8);
    for (const k of ['X', 'Y', 'Z', 'a', 'b', 'chroma', 'hueDeg']) expect(typeof r.body[k]).toBe('number');
  });

  it('mismatched lengths, non-monotone wavelengths, too narrow a span → 400 with the path', async () => {
    expectProblem(await post('spectrum-colour', { wavelengthsNm: grid, reflectancePct: [1, 2, 3] }), 400, 'reflectancePct');
    const bad = [...grid];
    bad[10] = bad[9]!;
    expectProblem(
      await post('spectrum-colour', { wavelengthsNm: bad, reflectancePct: bad.map(() => 1) }),
      400,
      'wavelengthsNm.10',
    );
    expectProblem(await post('spectrum-colour', { wavelengthsNm: [450, 650], reflectancePct: [1, 1] }), 400, 'wavelengthsNm');
  });
});

describe('POST /api/v1/calc/colour-difference', () => {
  it('Sharma, Wu & Dalal (2005) Table 1 pair 1: ΔE00 = 2.0425; ΔE76 hand-computed √(2.6772² + 2.9734²) = 4.0011', async () => {
    const r = await post('colour-difference', { lab1: [50, 2.6772, -79.7751], lab2: [50, 0, -82.7485] });
    expect(r.status).toBe(200);
    expect(r.body.deltaE2000).toBeCloseTo(2.0425, 4);
    expect(r.body.deltaE76).toBeCloseTo(Math.hypot(2.6772, 2.9734), 10);
  });

  it('a malformed colour → 400 on its path', async () => {
    expectProblem(await post('colour-difference', { lab1: [50, 0], lab2: [50, 0, 0] }), 400, 'lab1');
    expectProblem(await post('colour-difference', { lab1: [150, 0, 0], lab2: [50, 0, 0] }), 400, 'lab1.0');
  });
});
