import { get, useFieldArray, useForm, useWatch, type UseFormRegister } from 'react-hook-form';
import { useEffect, useMemo, useRef } from 'react';
import { PAPER_SIZES, settingsSchema, TRACKING_PLACEHOLDER, type OwnerSettings, type SettingsForm } from '../../../shared/schemas/settings';
import { EU_COUNTRIES } from '../../../shared/tax/vat-rates';
import { Button } from '../../components/ui/Button';
import { ConfirmButton } from '../../components/ui/ConfirmButton';
import { ErrorState, Loading, PageHeader } from '../../components/ui/states';
import { TextField } from '../../components/ui/TextField';
import { useToast } from '../../components/ui/toast';
import { ApiError } from '../../lib/api';
import { useFormatters } from '../../lib/format';
import { useOwnerSettings, useRemoveLogo, useSaveSettings, useUploadLogo } from './api';
import { countryName as sharedCountryName, createFormatter } from '../../../shared/format';

// The owner's settings: one form over the shared settings schema. Money is typed in the shop's
// currency units and sent as cents; a zone's countries are typed as codes separated by commas.

type ZoneRow = { id?: number; name: string; countries: string; rate: string };
type FormValues = Omit<SettingsForm, 'shippingZones' | 'labourCentsPerHour'> & { labour: string; shippingZones: ZoneRow[] };

const cents = (value: string) => (value.trim() === '' ? Number.NaN : Math.round(Number(value.replace(',', '.')) * 100));
const units = (c: number) => (c / 100).toFixed(2);

function toForm(s: OwnerSettings): FormValues {
  const { shippingZones, labourCentsPerHour, ...rest } = s;
  return {
    ...rest,
    labour: units(labourCentsPerHour),
    shippingZones: shippingZones.map((z) => ({ id: z.id, name: z.name, countries: z.countries.join(', '), rate: units(z.rateCents) })),
  };
}

function toInput(v: FormValues): SettingsForm {
  const { labour, shippingZones, ...rest } = v;
  const pick = Object.fromEntries(Object.keys(settingsSchema.shape).filter((k) => k in rest).map((k) => [k, (rest as Record<string, unknown>)[k]]));
  return {
    ...(pick as SettingsForm),
    labourCentsPerHour: cents(labour),
    shippingZones: shippingZones.map((z) => ({ id: z.id, name: z.name, countries: z.countries.split(/[\s,;]+/).filter(Boolean), rateCents: cents(z.rate) })),
  };
}

/** Where a schema or server message about `path` shows on this form. */
function formField(path: string): string {
  if (path === 'labourCentsPerHour') return 'labour';
  const zone = /^shippingZones\.(\d+)\.(rateCents|countries)/.exec(path);
  if (zone) return `shippingZones.${zone[1]}.${zone[2] === 'rateCents' ? 'rate' : 'countries'}`;
  return path;
}

const countryName = (code: string) => sharedCountryName(code, 'en');

function Section({ title, id, children, note }: { title: string; id: string; children: React.ReactNode; note?: string }) {
  return (
    <section aria-labelledby={id} className="grid gap-4 rounded-lg bg-white p-6 shadow-sm md:grid-cols-2">
      <div className="md:col-span-2">
        <h2 id={id} className="text-xl font-bold text-spruce-900">{title}</h2>
        {note ? <p className="text-ink-soft">{note}</p> : null}
      </div>
      {children}
    </section>
  );
}

function Check({ label, hint, name, register }: { label: string; hint: string; name: 'ossOverThreshold' | 'pricesIncludeTax'; register: UseFormRegister<FormValues> }) {
  return (
    <label className="flex min-h-11 items-start gap-3">
      <input type="checkbox" className="mt-1 size-5" {...register(name)} />
      <span><span className="font-semibold">{label}</span><br /><span className="text-sm text-ink-soft">{hint}</span></span>
    </label>
  );
}

function LogoField({ logoUrl }: { logoUrl: string | null }) {
  const upload = useUploadLogo();
  const remove = useRemoveLogo();
  const toast = useToast();
  const input = useRef<HTMLInputElement>(null);
  const error = upload.error instanceof ApiError ? (upload.error.fields?.logo ?? upload.error.message) : undefined;
  return (
    <div className="flex flex-col gap-2 md:col-span-2">
      <label htmlFor="shop-logo" className="font-semibold">Logo</label>
      <div className="flex flex-wrap items-center gap-4">
        {logoUrl ? <img src={logoUrl} alt="The shop’s current logo" className="max-h-16 max-w-48 rounded border border-spruce-700/20 bg-paper p-1" /> : <p className="text-ink-soft">No logo yet: documents show the shop’s name alone.</p>}
        <input
          id="shop-logo" ref={input} type="file" accept="image/png,image/jpeg" aria-describedby="shop-logo-hint"
          aria-invalid={error ? true : undefined} className="min-h-11"
          onChange={(e) => {
            const file = e.target.files?.[0];
            if (!file) return;
            upload.mutate(file, {
              onSuccess: () => toast('Logo saved: invoices, sheets and mails use it from now on'),
              onError: (err) => toast(err.message, 'alarm'),
              onSettled: () => { if (input.current) input.current.value = ''; },
            });
          }}
        />
        {logoUrl ? <ConfirmButton label="Remove logo" question="Remove the logo? Documents then show the shop’s name alone." confirmLabel="Remove" onConfirm={() => remove.mutate(undefined, { onSuccess: () => toast('Logo removed') })} /> : null}
      </div>
      <p id="shop-logo-hint" className="text-sm text-ink-soft">PNG or JPEG, at most 512 KB. {upload.isPending ? 'Uploading…' : ''}</p>
      {error ? <p role="alert" className="text-sm font-semibold text-alarm-700">{error}</p> : null}
    </div>
  );
}

function SettingsForm({ settings }: { settings: OwnerSettings }) {
  const save = useSaveSettings();
  const toast = useToast();
  const { dateTime } = useFormatters();
  const form = useForm<FormValues>({ defaultValues: toForm(settings) });
  const errors = form.formState.errors;
  const zones = useFieldArray({ control: form.control, name: 'shippingZones' });
  const carriers = useFieldArray({ control: form.control, name: 'carriers', keyName: 'key' });
  useEffect(() => { form.reset(toForm(settings)); }, [settings, form]);
  const err = (name: string) => (get(errors, name) as { message?: string } | undefined)?.message;
  const field = (name: Parameters<typeof form.register>[0], label: string, props: Record<string, unknown> = {}) => (
    <TextField label={label} error={err(name)} {...props} {...form.register(name)} />
  );
  const locale = useWatch({ control: form.control, name: 'locale' });
  const sample = useMemo(() => {
    try {
      const f = createFormatter({ locale, currency: settings.currency });
      return `${f.money(123_450)} · ${f.date(new Date())}`;
    } catch {
      return '';
    }
  }, [locale, settings.currency]);

  const onSubmit = form.handleSubmit((values) => {
    form.clearErrors();
    const parsed = settingsSchema.safeParse(toInput(values));
    if (!parsed.success) {
      for (const issue of parsed.error.issues) form.setError(formField(issue.path.join('.')) as never, { message: issue.message });
      toast('Some settings need attention: see the messages beside them', 'alarm');
      return;
    }
    save.mutate(parsed.data, {
      onSuccess: () => toast('Settings saved'),
      onError: (error) => {
        if (error instanceof ApiError && error.fields) for (const [name, message] of Object.entries(error.fields)) form.setError(formField(name) as never, { message });
        toast(error.message, 'alarm');
      },
    });
  });

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-6">
      <Section title="Shop identity" id="identity" note="Shown on the storefront, in every mail, on invoices, spec sheets and the /verify page.">
        {field('shopName', 'Shop name')}
        {field('shopEmail', 'Shop e-mail', { type: 'email' })}
        {field('shopAddress', 'Postal address', { hint: 'One line, parts separated by “·”, e.g. Kiln Yard 7 · 10999 Berlin · Germany' })}
        {field('vatId', 'VAT id', { hint: 'Printed on invoices, e.g. DE123456789' })}
        {field('publicUrl', 'Public web address', { hint: 'e.g. https://shop.example', type: 'url' })}
        <LogoField logoUrl={settings.logoUrl} />
      </Section>

      <Section title="Numbers and formatting" id="numbers">
        {field('serialPrefix', 'Serial prefix', { hint: 'Letters before each unit’s serial, e.g. HM-B0007-012K' })}
        {field('orderNumberPrefix', 'Order-number prefix', { hint: 'Letters before each order number, e.g. HM-10042' })}
        {field('timeZone', 'Time zone', { hint: 'e.g. Europe/Berlin' })}
        {field('locale', 'Formatting locale', { hint: sample ? `Looks like: ${sample}` : 'A language tag such as en-GB or de-DE' })}
        {field('labour', `Labour rate per hour (${settings.currency})`, { inputMode: 'decimal' })}
      </Section>

      <Section title="Tax" id="tax" note="VAT follows the destination: the home rate at home, the destination’s rate for other EU consumers when over the distance-selling threshold, zero for exports.">
        <div className="flex flex-col gap-1">
          <label htmlFor="home-country" className="font-semibold">Home country</label>
          <select id="home-country" className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-3" aria-invalid={err('homeCountry') ? true : undefined} {...form.register('homeCountry')}>
            {EU_COUNTRIES.map((c) => <option key={c} value={c}>{countryName(c)} ({c})</option>)}
          </select>
          {err('homeCountry') ? <p className="text-sm font-semibold text-alarm-700">{err('homeCountry')}</p> : null}
        </div>
        <div className="flex flex-col gap-2">
          <Check name="ossOverThreshold" register={form.register} label="Over the EU distance-selling threshold" hint="Other EU consumers pay their own country’s rate (declared through the one-stop shop). Off: the home rate." />
          <Check name="pricesIncludeTax" register={form.register} label="Catalog prices include VAT" hint="Prices are the home country’s gross prices. Off: prices are net and VAT is added." />
        </div>
      </Section>

      <Section title="Shipping zones" id="zones" note="A country belongs to one zone at most; the cart offers only countries in a zone.">
        <div className="flex flex-col gap-4 md:col-span-2">
          {zones.fields.map((z, i) => (
            <fieldset key={z.id} className="grid gap-3 rounded-md border border-spruce-700/20 p-4 md:grid-cols-[1fr_2fr_1fr_auto]">
              <legend className="px-1 font-semibold">Zone {i + 1}</legend>
              {field(`shippingZones.${i}.name`, 'Zone name')}
              {field(`shippingZones.${i}.countries`, 'Countries', { hint: 'Two-letter codes separated by commas, e.g. DE, AT' })}
              {field(`shippingZones.${i}.rate`, `Rate (${settings.currency})`, { inputMode: 'decimal' })}
              <div className="flex items-end"><Button type="button" variant="quiet" onClick={() => zones.remove(i)} aria-label={`Remove zone ${i + 1}`}>Remove</Button></div>
            </fieldset>
          ))}
          {err('shippingZones') ? <p role="alert" className="font-semibold text-alarm-700">{err('shippingZones')}</p> : null}
          <div><Button type="button" variant="secondary" onClick={() => zones.append({ name: '', countries: '', rate: '' })}>Add a zone</Button></div>
        </div>
      </Section>

      <Section title="Carriers" id="carriers" note={`The tracking link is the template with ${TRACKING_PLACEHOLDER} replaced by the parcel’s tracking number. Carriers are never deleted, only switched off.`}>
        <div className="flex flex-col gap-4 md:col-span-2">
          {carriers.fields.map((c, i) => (
            <fieldset key={c.key} className="grid gap-3 rounded-md border border-spruce-700/20 p-4 md:grid-cols-[1fr_2fr_auto]">
              <legend className="px-1 font-semibold">Carrier {i + 1}</legend>
              {field(`carriers.${i}.name`, 'Carrier name')}
              {field(`carriers.${i}.trackingUrlTemplate`, 'Tracking-link template', { hint: `e.g. https://carrier.example/track?n=${TRACKING_PLACEHOLDER}` })}
              <label className="flex min-h-11 items-center gap-2 self-end"><input type="checkbox" className="size-5" {...form.register(`carriers.${i}.active`)} /> In use</label>
            </fieldset>
          ))}
          <div><Button type="button" variant="secondary" onClick={() => carriers.append({ name: '', trackingUrlTemplate: '', active: true })}>Add a carrier</Button></div>
        </div>
      </Section>

      <Section title="Bench and quality" id="bench">
        {field('vfTestCurrentMa', 'Vf test current (mA)', { inputMode: 'decimal', hint: 'The current at which clipping devices are matched' })}
        {field('thdTolerancePercent', 'THD tolerance (%)', { inputMode: 'decimal', hint: 'Measured against predicted THD, relative' })}
        {field('maxCurrentDrawMa', 'Highest current draw (mA)', { inputMode: 'decimal', hint: 'A unit drawing more needs a reason to pass' })}
        {field('fastStepPercent', 'Fast-step check (%)', { inputMode: 'numeric', hint: 'A step finished in under this share of its standard time asks for confirmation' })}
        <div className="flex flex-col gap-1">
          <label htmlFor="paper-size" className="font-semibold">Sheet paper size</label>
          <select id="paper-size" className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-3" {...form.register('paperSize')}>
            {PAPER_SIZES.map((p) => <option key={p} value={p}>{p}</option>)}
          </select>
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor="staff-names" className="font-semibold">Staff on spec sheets</label>
          <select id="staff-names" className="min-h-11 rounded-md border border-spruce-700/40 bg-white px-3" {...form.register('sheetStaffNames')}>
            <option value="initials">Initials</option>
            <option value="names">Full names</option>
          </select>
        </div>
      </Section>

      <div className="sticky bottom-0 flex flex-wrap items-center gap-4 border-t border-spruce-700/20 bg-paper/95 py-4">
        <Button type="submit" busy={save.isPending}>Save settings</Button>
        <Button type="button" variant="secondary" onClick={() => form.reset(toForm(settings))}>Undo unsaved edits</Button>
        <p className="text-sm text-ink-soft" aria-live="polite">Last saved {dateTime(settings.updatedAt)}</p>
      </div>

      <section aria-labelledby="changes" className="rounded-lg bg-white p-6 shadow-sm">
        <h2 id="changes" className="mb-3 text-xl font-bold text-spruce-900">Recent changes</h2>
        {settings.changes.length === 0 ? <p className="text-ink-soft">No changes yet.</p> : (
          <table className="w-full text-left text-sm">
            <caption className="sr-only">Recent changes to the settings</caption>
            <thead><tr><th className="py-1">When</th><th>Who</th><th>Setting</th><th>Before</th><th>After</th></tr></thead>
            <tbody>
              {settings.changes.map((c) => (
                <tr key={c.id} className="border-t border-spruce-700/10 align-top">
                  <td className="py-1 pr-2 whitespace-nowrap">{dateTime(c.changedAt)}</td>
                  <td className="pr-2">{c.userName}</td>
                  <td className="pr-2 font-semibold">{c.field}</td>
                  <td className="max-w-64 truncate pr-2 font-mono text-xs" title={JSON.stringify(c.oldValue)}>{JSON.stringify(c.oldValue)}</td>
                  <td className="max-w-64 truncate font-mono text-xs" title={JSON.stringify(c.newValue)}>{JSON.stringify(c.newValue)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
    </form>
  );
}

export default function SettingsPage() {
  const settings = useOwnerSettings();
  return (
    <>
      <PageHeader title="Shop settings" />
      {settings.isPending ? <Loading label="Loading the settings…" /> : settings.isError ? <ErrorState error={settings.error} retry={() => settings.refetch()} /> : <SettingsForm settings={settings.data} />}
    </>
  );
}
