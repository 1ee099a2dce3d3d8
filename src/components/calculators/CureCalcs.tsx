/** Calculator islands for cure: Arrhenius equivalent minutes and the activation energy of two schedules. */
import CalcForm, { num, numberRows, opt, Out, sig } from './CalcForm.tsx';

export function CureEquivalentCalc() {
  return (
    <CalcForm<{ equivalentMinutes: number; minutesAtOrAbove?: number }>
      endpoint="/api/v1/calc/cure-equivalent"
      fields={[
        {
          name: 'profile',
          label: 'Temperature profile, one point per line: minutes, temperature',
          unit: 'min, °C',
          type: 'textarea',
          rows: 8,
          initial: '# minutes, °C\n0, 25\n30, 110\n210, 110\n240, 40',
        },
        {
          name: 'activationEnergyKJMol',
          label: 'Activation energy Ea',
          unit: 'kJ/mol',
          initial: '75',
          hint: 'From the lacquer maker or the lab’s validation.',
        },
        { name: 'referenceC', label: 'Reference temperature', unit: '°C', initial: '110' },
        { name: 'thresholdC', label: 'Count time at or above (optional)', unit: '°C', initial: '100' },
      ]}
      build={(v) => ({
        profile: numberRows(v['profile'] ?? '').map(([minutes, tempC]) => ({ minutes, tempC })),
        ...opt('activationEnergyKJMol', num(v['activationEnergyKJMol'])),
        ...opt('referenceC', num(v['referenceC'])),
        ...opt('thresholdC', num(v['thresholdC'])),
      })}
      render={(r, v) => (
        <dl>
          <Out label={`Equivalent minutes at ${v['referenceC']} °C`} value={sig(r.equivalentMinutes)} unit="min" strong />
          {r.minutesAtOrAbove !== undefined && (
            <Out label={`Time at or above ${v['thresholdC']} °C`} value={sig(r.minutesAtOrAbove)} unit="min" />
          )}
        </dl>
      )}
    />
  );
}

export function ActivationEnergyCalc() {
  return (
    <CalcForm<{ activationEnergyKJMol: number }>
      endpoint="/api/v1/calc/activation-energy"
      fields={[
        { name: 'aMinutes', label: 'Schedule A: time', unit: 'min', initial: '60' },
        { name: 'aTempC', label: 'Schedule A: temperature', unit: '°C', initial: '120' },
        { name: 'bMinutes', label: 'Schedule B: time', unit: 'min', initial: '120' },
        { name: 'bTempC', label: 'Schedule B: temperature', unit: '°C', initial: '110' },
      ]}
      build={(v) => ({
        scheduleA: { ...opt('minutes', num(v['aMinutes'])), ...opt('tempC', num(v['aTempC'])) },
        scheduleB: { ...opt('minutes', num(v['bMinutes'])), ...opt('tempC', num(v['bTempC'])) },
      })}
      render={(r) => (
        <dl>
          <Out label="Activation energy Ea" value={sig(r.activationEnergyKJMol)} unit="kJ/mol" strong />
        </dl>
      )}
    />
  );
}
