import { useState } from 'react';
import { deviceReadingsSchema } from '../../../shared/schemas/production';
import { isVfOutOfRange } from '../../../shared/production/forward-voltage';
import { Button } from '../../components/ui/Button';
import { Notice } from '../../components/ui/states';
import { useToast } from '../../components/ui/toast';
import { ApiError } from '../../lib/api';
import { useSaveReadings, type UnitDetail } from './api';
import { shopFormat } from '../../lib/format';

/** Measured forward voltage of each fitted clipping device; out-of-range values are flagged as they are typed. */
export function DeviceReadings({ unitId, devices, testCurrentMa }: { unitId: number; devices: UnitDetail['devices']; testCurrentMa: number }) {
  const save = useSaveReadings(unitId);
  const toast = useToast();
  const [values, setValues] = useState<Record<number, string>>(() => Object.fromEntries(devices.map((d) => [d.optionDeviceId, d.measuredVf === null ? '' : String(Math.round(d.measuredVf * 1e4) / 1e4) /* an input's value, not display: plain digits */])));
  const [accept, setAccept] = useState(false);
  const [errors, setErrors] = useState<Record<string, string>>({});
  if (!devices.length) return <p className="text-ink-soft">This option has no clipping devices to match.</p>;
  const flagged = devices.filter((d) => values[d.optionDeviceId] !== '' && isVfOutOfRange(d.kind, Number(values[d.optionDeviceId])));

  const submit = () => {
    const parsed = deviceReadingsSchema.safeParse({ readings: devices.map((d) => ({ optionDeviceId: d.optionDeviceId, vf: values[d.optionDeviceId] })), acceptOutOfRange: accept });
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [i.path.join('.'), i.message])));
      return;
    }
    setErrors({});
    save.mutate(parsed.data, {
      onSuccess: (r) => toast(`Readings saved; this unit’s predicted THD is now ${shopFormat().number(r.predicted.thdPercent, 2)} %`),
      onError: (e) => { if (e instanceof ApiError && e.fields) setErrors(e.fields); toast(e.message, 'alarm'); },
    });
  };

  return (
    <div className="grid gap-3">
      <p>Measure each device at the bench test current of <strong>{testCurrentMa} mA</strong>.</p>
      <div className="grid gap-3 sm:grid-cols-2">
        {devices.map((d, i) => {
          const out = flagged.includes(d);
          const error = errors[`readings.${i}.vf`];
          return (
            <div key={d.optionDeviceId} className="flex flex-col gap-1">
              <label htmlFor={`vf-${d.optionDeviceId}`} className="font-semibold">Vf of {d.name}, {d.side} string #{d.position + 1} (V)</label>
              {d.slot ? <p className="text-sm">Take <strong className="font-mono">{d.slot.label}</strong> from its tray (measured {shopFormat().number(d.slot.vf, 4)} V)</p> : null}
              <input id={`vf-${d.optionDeviceId}`} inputMode="decimal" value={values[d.optionDeviceId]} onChange={(e) => setValues((v) => ({ ...v, [d.optionDeviceId]: e.target.value }))}
                aria-invalid={out || Boolean(error) || undefined} aria-describedby={`vf-${d.optionDeviceId}-hint`}
                className={`min-h-11 rounded-md border px-3 font-mono ${out || error ? 'border-alarm-700' : 'border-spruce-700/40'}`} />
              <p id={`vf-${d.optionDeviceId}-hint`} className={`text-sm ${out || error ? 'font-semibold text-alarm-700' : 'text-ink-soft'}`}>
                {error ?? (out ? `Outside ${shopFormat().number(d.range.min, 2)}–${shopFormat().number(d.range.max, 2)} V for ${d.kind}: measure again` : `Nominal ${shopFormat().number(d.nominalVf, 3)} V · expected ${shopFormat().number(d.range.min, 2)}–${shopFormat().number(d.range.max, 2)} V`)}
              </p>
            </div>
          );
        })}
      </div>
      {flagged.length ? (
        <Notice tone="alarm">
          <label className="flex min-h-11 items-center gap-3"><input type="checkbox" className="size-5" checked={accept} onChange={(e) => setAccept(e.target.checked)} /> I re-measured: keep the flagged value{flagged.length === 1 ? '' : 's'}</label>
        </Notice>
      ) : null}
      <div><Button busy={save.isPending} onClick={submit}>Save readings</Button></div>
    </div>
  );
}
