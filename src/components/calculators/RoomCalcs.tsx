/** Dew point and blush risk of the coating room (the server computes). */
import CalcForm, { num, opt } from './CalcForm.tsx';

export function DewPointCalc() {
  return (
    <CalcForm<{ dewPointC: number; blush: { risk: string; message: string; marginC: number } | null }>
      endpoint="/api/v1/calc/dew-point"
      fields={[
        { name: 'airC', label: 'Room air temperature', unit: '°C', initial: '22' },
        { name: 'rhPct', label: 'Relative humidity', unit: '%', initial: '55' },
        { name: 'surfaceC', label: 'Bath or lens surface temperature (optional)', unit: '°C', initial: '16' },
        { name: 'marginC', label: 'Margin above the dew point', unit: '°C', initial: '3' },
      ]}
      build={(v) => ({
        ...opt('airC', num(v['airC'])),
        ...opt('rhPct', num(v['rhPct'])),
        ...opt('surfaceC', num(v['surfaceC'])),
        ...opt('marginC', num(v['marginC'])),
      })}
      render={(r) => (
        <div>
          <p>
            Dew point <strong data-dew-point={r.dewPointC.toFixed(1)}>{r.dewPointC.toFixed(1)} °C</strong>
          </p>
          {r.blush && (
            <p className={r.blush.risk === 'clear' ? '' : 'caution'} data-risk={r.blush.risk}>
              {r.blush.message}
            </p>
          )}
        </div>
      )}
    />
  );
}
