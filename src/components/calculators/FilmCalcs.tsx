/** Calculator islands for the dip bath: film thickness, speed advisor, calibration, flow cups, additions. */
import { CUPS } from '../../lib/domain/film/viscosity-cups.ts';
import { BATH_CAUTION } from '../../lib/shared/baths.ts';
import CalcForm, { num, numberRows, opt, Out, sig, Warnings } from './CalcForm.tsx';

export function DipThicknessCalc() {
  return (
    <CalcForm<{
      wetThicknessUm: number;
      dryThicknessUm?: number;
      capillaryNumber: number;
      capillaryLengthMm: number;
      regime: string;
      warnings: string[];
    }>
      endpoint="/api/v1/calc/dip-thickness"
      fields={[
        { name: 'viscosityMPaS', label: 'Dynamic viscosity η', unit: 'mPa·s', initial: '9' },
        { name: 'speedMmS', label: 'Withdrawal speed U', unit: 'mm/s', initial: '2.0' },
        { name: 'surfaceTensionMNm', label: 'Surface tension γ', unit: 'mN/m', initial: '25' },
        { name: 'densityKgM3', label: 'Density ρ', unit: 'kg/m³', initial: '950' },
        {
          name: 'solidsVolumeFraction',
          label: 'Solids volume fraction φ (optional)',
          unit: '0–1',
          hint: 'Gives the dry thickness ≈ wet × φ.',
        },
      ]}
      build={(v) => ({
        ...opt('viscosityMPaS', num(v['viscosityMPaS'])),
        ...opt('speedMmS', num(v['speedMmS'])),
        ...opt('surfaceTensionMNm', num(v['surfaceTensionMNm'])),
        ...opt('densityKgM3', num(v['densityKgM3'])),
        ...opt('solidsVolumeFraction', num(v['solidsVolumeFraction'])),
      })}
      render={(r) => (
        <>
          <dl>
            <Out label="Wet thickness" value={sig(r.wetThicknessUm)} unit="µm" strong />
            {r.dryThicknessUm !== undefined && <Out label="Dry thickness" value={sig(r.dryThicknessUm)} unit="µm" strong />}
            <Out label="Capillary number Ca = ηU/γ" value={sig(r.capillaryNumber, 3)} />
            <Out label="Capillary length ℓc = √(γ/ρg)" value={sig(r.capillaryLengthMm)} unit="mm" />
            <Out
              label="Regime"
              value={
                r.regime === 'landau-levich'
                  ? 'Landau–Levich range (Ca ≤ 10⁻²)'
                  : 'drainage-limited (above the Landau–Levich range)'
              }
            />
          </dl>
          <Warnings items={r.warnings} />
        </>
      )}
    />
  );
}

export function SpeedAdvisorCalc() {
  return (
    <CalcForm<{ speedMmS: number; model: string; capillaryNumber?: number; warnings: string[] }>
      endpoint="/api/v1/calc/speed-advisor"
      fields={[
        { name: 'viscosityMPaS', label: 'Bath viscosity now η', unit: 'mPa·s', initial: '9' },
        {
          name: 'targetKind',
          label: 'Target is the',
          type: 'select',
          options: [
            { value: 'dry', label: 'dry (cured) thickness' },
            { value: 'wet', label: 'wet thickness' },
          ],
          initial: 'dry',
        },
        { name: 'targetUm', label: 'Target thickness', unit: 'µm', initial: '2.0' },
        {
          name: 'thicknessConstant',
          label: 'Calibrated constant C (optional)',
          unit: 'µm/(mPa·s·mm/s)^(2/3)',
          hint: 'From the calibration calculator; replaces the theory when given.',
        },
        {
          name: 'solidsVolumeFraction',
          label: 'Solids volume fraction φ',
          unit: '0–1',
          initial: '0.25',
          hint: 'Needed for a dry target without a calibrated constant.',
        },
        { name: 'surfaceTensionMNm', label: 'Surface tension γ', unit: 'mN/m', initial: '25' },
        { name: 'densityKgM3', label: 'Density ρ', unit: 'kg/m³', initial: '950' },
      ]}
      build={(v) => ({
        ...opt('viscosityMPaS', num(v['viscosityMPaS'])),
        ...opt(v['targetKind'] === 'wet' ? 'targetWetThicknessUm' : 'targetDryThicknessUm', num(v['targetUm'])),
        ...opt('thicknessConstant', num(v['thicknessConstant'])),
        ...opt('solidsVolumeFraction', num(v['solidsVolumeFraction'])),
        ...opt('surfaceTensionMNm', num(v['surfaceTensionMNm'])),
        ...opt('densityKgM3', num(v['densityKgM3'])),
      })}
      render={(r) => (
        <>
          <dl>
            <Out label="Withdrawal speed" value={sig(r.speedMmS, 3)} unit="mm/s" strong />
            <Out
              label="Model"
              value={
                r.model === 'calibrated'
                  ? 'the lab’s calibrated constant'
                  : r.model === 'landau-levich'
                    ? 'drag-out model, Landau–Levich range'
                    : 'drag-out model, drainage-limited range'
              }
            />
            {r.capillaryNumber !== undefined && <Out label="Capillary number at that speed" value={sig(r.capillaryNumber, 3)} />}
          </dl>
          <Warnings items={r.warnings} />
        </>
      )}
    />
  );
}

interface Fit {
  constant: number;
  exponent: number;
  rSquared: number;
  residualSdLog: number;
  residualSdUm: number;
  n: number;
}

export function CalibrationCalc() {
  return (
    <CalcForm<{ fixedExponent: Fit; freeExponent: Fit | null }>
      endpoint="/api/v1/calc/calibration"
      fields={[
        {
          name: 'points',
          label: 'Measurements, one per line: speed, viscosity, thickness',
          unit: 'mm/s, mPa·s, µm',
          type: 'textarea',
          rows: 8,
          initial:
            '# speed mm/s, viscosity mPa·s, cured thickness µm\n1.8, 9.0, 1.86\n2.0, 9.2, 2.03\n2.2, 9.5, 2.21\n2.0, 10.5, 2.15',
        },
      ]}
      build={(v) => ({
        points: numberRows(v['points'] ?? '').map(([speedMmS, viscosityMPaS, thicknessUm]) => ({
          speedMmS,
          viscosityMPaS,
          thicknessUm,
        })),
      })}
      render={(r) => {
        const fit = (label: string, f: Fit) => (
          <div className="mb-3">
            <h3 className="font-bold">{label}</h3>
            <dl>
              <Out label="Constant C" value={sig(f.constant)} unit={`µm/(mPa·s·mm/s)^${sig(f.exponent, 3)}`} strong />
              <Out label="Exponent k" value={sig(f.exponent, 4)} />
              <Out label="r² (log space)" value={sig(f.rSquared, 4)} />
              <Out label="Residual SD" value={sig(f.residualSdUm, 3)} unit="µm" />
              <Out label="Relative residual SD" value={sig(f.residualSdLog * 100, 3)} unit="%" />
              <Out label="Points" value={f.n} />
            </dl>
          </div>
        );
        return (
          <>
            {fit('Landau–Levich exponent fixed at 2/3', r.fixedExponent)}
            {r.freeExponent ? (
              fit('Exponent fitted freely', r.freeExponent)
            ) : (
              <p className="text-sm text-ink-soft">A free-exponent fit needs 3 or more points with different ηU.</p>
            )}
          </>
        );
      }}
    />
  );
}

export function ViscosityCupCalc() {
  return (
    <CalcForm<{
      inRange: boolean;
      kinematicMm2S?: number;
      dynamicMPaS?: number;
      validSeconds: { min: number; max: number };
      source: string;
      provenance: string;
      message?: string;
    }>
      endpoint="/api/v1/calc/viscosity-cup"
      fields={[
        {
          name: 'cup',
          label: 'Cup',
          type: 'select',
          options: CUPS.map((c) => ({ value: c.id, label: `${c.id} (${c.validSeconds.min}–${c.validSeconds.max} s)` })),
          initial: 'zahn-1',
        },
        { name: 'seconds', label: 'Efflux time', unit: 's', initial: '38' },
        { name: 'densityGCm3', label: 'Density (optional)', unit: 'g/cm³', hint: 'Gives the dynamic viscosity η = ν·ρ.' },
        {
          name: 'own1',
          label: 'Your cup’s constants (optional): A, or k',
          hint: 'From the cup’s calibration certificate: A and B of ν = A·t − B/t for ISO 2431 and DIN cups, k and c of ν = k(t − c) for the others. Recommended where the table’s constants are marked from memory.',
        },
        { name: 'own2', label: 'Your cup’s constants (optional): B, or c' },
      ]}
      build={(v) => {
        const cup = v['cup'] ?? '';
        const first = num(v['own1']);
        const second = num(v['own2']);
        const ab = cup.startsWith('iso-') || cup.startsWith('din-');
        const equation =
          first === undefined || second === undefined
            ? undefined
            : ab
              ? { kind: 'a-b/t', a: first, b: second }
              : { kind: 'linear', k: first, c: second };
        return {
          cup,
          ...opt('seconds', num(v['seconds'])),
          ...opt('densityGCm3', num(v['densityGCm3'])),
          ...opt('equation', equation),
        };
      }}
      render={(r) =>
        r.inRange ? (
          <dl>
            <Out label="Kinematic viscosity ν" value={sig(r.kinematicMm2S ?? 0)} unit="mm²/s" strong />
            {r.dynamicMPaS !== undefined && <Out label="Dynamic viscosity η" value={sig(r.dynamicMPaS)} unit="mPa·s" />}
            <Out label="Cup window" value={`${r.validSeconds.min}–${r.validSeconds.max}`} unit="s" />
            <Out
              label="Source"
              value={`${r.source}${r.provenance === 'from memory' ? ' (constants from memory: enter your cup certificate’s constants to replace them)' : ''}`}
            />
          </dl>
        ) : (
          <p role="alert" className="rounded border-l-4 border-alert-high bg-alert-bg p-2 font-bold">
            <span aria-hidden="true">✕ </span>
            {r.message}
          </p>
        )
      }
    />
  );
}

export function BathAdditionCalc() {
  return (
    <>
      <CalcForm<{ kind: 'solvent' | 'lacquer' | 'none'; massKg: number; resultingBathMassKg: number; resultingSolidsPct: number }>
        endpoint="/api/v1/calc/bath-addition"
        fields={[
          { name: 'bathMassKg', label: 'Bath mass now', unit: 'kg', initial: '36' },
          { name: 'solidsNowPct', label: 'Solids now', unit: 'wt %', initial: '31.2' },
          { name: 'solidsTargetPct', label: 'Solids target', unit: 'wt %', initial: '30' },
          { name: 'lacquerSolidsPct', label: 'Fresh lacquer solids (to raise solids)', unit: 'wt %' },
          { name: 'maxBathMassKg', label: 'Tank capacity (optional)', unit: 'kg' },
        ]}
        build={(v) => ({
          ...opt('bathMassKg', num(v['bathMassKg'])),
          ...opt('solidsNowPct', num(v['solidsNowPct'])),
          ...opt('solidsTargetPct', num(v['solidsTargetPct'])),
          ...opt('lacquerSolidsPct', num(v['lacquerSolidsPct'])),
          ...opt('maxBathMassKg', num(v['maxBathMassKg'])),
        })}
        render={(r) => (
          <dl>
            <Out
              label="Add"
              value={
                r.kind === 'none'
                  ? 'nothing — on target'
                  : `${r.massKg.toFixed(2)} kg of ${r.kind === 'solvent' ? 'solvent' : 'fresh lacquer'}`
              }
              strong
            />
            <Out label="Bath mass after" value={r.resultingBathMassKg.toFixed(2)} unit="kg" />
            <Out label="Solids after" value={r.resultingSolidsPct.toFixed(2)} unit="wt %" />
          </dl>
        )}
      />
      <p className="caution mt-4">
        <strong>Caution.</strong> {BATH_CAUTION}
      </p>
    </>
  );
}
