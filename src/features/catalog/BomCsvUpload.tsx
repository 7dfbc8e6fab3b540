import { shopFormat } from '../../lib/format';
import type { ColumnDef } from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import { BOM_CSV_MAX_BYTES } from '../../../shared/schemas/catalog';
import { Button } from '../../components/ui/Button';
import { DataTable } from '../../components/ui/DataTable';
import { Notice } from '../../components/ui/states';
import { useToast } from '../../components/ui/toast';
import { useImportBomCsv, usePreviewBomCsv, type CsvPreview } from './api';

type Row = CsvPreview['rows'][number];

/** Choose a CSV, see every row's problem, then import all rows at once (replacing this revision's BOM). */
export function BomCsvUpload({ revisionId }: { revisionId: number }) {
  const preview = usePreviewBomCsv(revisionId);
  const importer = useImportBomCsv(revisionId);
  const toast = useToast();
  const [file, setFile] = useState<File | null>(null);
  const columns = useMemo<ColumnDef<Row, unknown>[]>(() => [
    { accessorKey: 'row', header: 'Row' },
    { accessorKey: 'partNumber', header: 'Part number' },
    { accessorKey: 'quantity', header: 'Quantity', cell: ({ row }) => row.original.quantity ?? '—' },
    { id: 'designators', header: 'Designators', cell: ({ row }) => row.original.designators.join(' ') },
    { id: 'problems', header: 'Problem', cell: ({ row }) => (row.original.problems.length ? <span className="font-semibold text-alarm-700">{row.original.problems.join('; ')}</span> : 'OK') },
  ], []);
  const choose = (f: File | undefined) => {
    if (!f) return;
    if (f.size > BOM_CSV_MAX_BYTES) { toast(`That file is ${shopFormat().number(f.size / 1024, 0)} KB; the limit is ${shopFormat().number(BOM_CSV_MAX_BYTES / 1024, 0)} KB`, 'alarm'); return; }
    setFile(f);
    preview.mutate(f, { onError: (err) => toast(err.message, 'alarm') });
  };
  const result = preview.data;
  return (
    <section className="flex flex-col gap-3 rounded-lg bg-white p-4 shadow-sm" aria-label="Upload a BOM from CSV">
      <h3 className="text-lg font-bold text-spruce-900">Upload a BOM from CSV</h3>
      <p className="text-ink-soft">
        A header row with the columns <code>part number</code>, <code>quantity</code> and <code>designators</code> (any letter case; <code>notes</code> optional).
        Designators are separated by spaces or commas and must number the same as the quantity. Importing replaces this revision’s BOM.
      </p>
      <label className="flex min-h-11 w-fit cursor-pointer items-center rounded-md border border-spruce-700/40 px-4 font-semibold">
        Choose CSV file
        <input type="file" accept=".csv,text/csv" className="sr-only" onChange={(e) => { choose(e.target.files?.[0]); e.target.value = ''; }} />
      </label>
      {preview.isError ? <Notice tone="alarm">{preview.error.message}{(preview.error as { fields?: Record<string, string> }).fields?.file ? `: ${(preview.error as { fields?: Record<string, string> }).fields!.file}` : ''}</Notice> : null}
      {result && file ? (
        <>
          <Notice tone={result.ok ? 'good' : 'alarm'}>
            {file.name}: {result.ok ? `all ${result.total} rows are good` : `${result.bad} of ${result.total} rows need fixing — nothing can be imported until they do`}
          </Notice>
          <DataTable data={result.rows} columns={columns} caption="CSV preview" rowClassName={(r) => (r.problems.length ? 'bg-alarm-100' : '')} />
          <div>
            <Button disabled={!result.ok} busy={importer.isPending} onClick={() => importer.mutate(file, {
              onSuccess: ({ revision }) => { toast(`Imported ${revision.lines.length} BOM lines from ${file.name}`); preview.reset(); setFile(null); },
              onError: (err) => toast(err.message, 'alarm'),
            })}>Import {result.total} rows</Button>
          </div>
        </>
      ) : null}
    </section>
  );
}
