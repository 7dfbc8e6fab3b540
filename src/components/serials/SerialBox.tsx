import { useMutation } from '@tanstack/react-query';
import { useState, type FormEvent } from 'react';
import { useNavigate } from 'react-router';
import { api } from '../../lib/api';
import { Button } from '../ui/Button';
import { useScanner } from './useScanner';

interface FoundUnit { id: number; serial: string; state: string }

/**
 * A serial box that opens the unit: type a serial and press Enter, or scan its label. A scanner
 * types like a keyboard and ends with Enter, so it works in the box, and also anywhere on the page
 * while no other field has the focus. `to(unit)` is the page to open.
 */
export function SerialBox({ to, label = 'Open a unit by serial' }: { to: (unit: FoundUnit) => string; label?: string }) {
  const navigate = useNavigate();
  const [serial, setSerial] = useState('');
  const find = useMutation({
    mutationFn: (text: string) => api.get<FoundUnit>(`/api/serials/${encodeURIComponent(text.trim())}`),
    onSuccess: (unit) => navigate(to(unit)),
  });
  const open = (text: string) => {
    const trimmed = text.trim();
    if (!trimmed) return;
    setSerial(trimmed);
    find.mutate(trimmed);
  };
  useScanner(open);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    open(serial);
  };
  return (
    <form role="search" aria-label="Find a unit" onSubmit={submit} className="mb-4 flex flex-wrap items-end gap-2 rounded-lg bg-white p-3 shadow-sm">
      <div className="flex min-w-64 flex-1 flex-col gap-1">
        <label htmlFor="serial-box" className="font-semibold">{label}</label>
        <input id="serial-box" value={serial} onChange={(e) => setSerial(e.target.value)} autoComplete="off" spellCheck={false} enterKeyHint="go"
          aria-describedby="serial-box-hint" aria-invalid={find.isError || undefined}
          className={`min-h-11 rounded-md border px-3 font-mono uppercase ${find.isError ? 'border-alarm-700' : 'border-spruce-700/40'}`} />
        <p id="serial-box-hint" className={`text-sm ${find.isError ? 'font-semibold text-alarm-700' : 'text-ink-soft'}`}>
          {find.isError ? find.error.message : 'Type it and press Enter, or scan the label.'}
        </p>
      </div>
      <Button type="submit" busy={find.isPending}>Open</Button>
    </form>
  );
}
