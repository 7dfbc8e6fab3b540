import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { listSearch, PAGE_SIZE_MAX, type Page } from '../../../shared/schemas/list';
import type { CircuitSpec } from '../../../shared/engine/index';
import type { ContractJson, DriveStageValues, NetworkValues } from '../../../shared/catalog/circuit';
import type {
  BomLineInput, BuildStepInput, CustomDeviceInput, DriveStageInput, ModelInput, MovementInput, OptionInput, PartInput, ReceiveInput,
} from '../../../shared/schemas/catalog';
import { api } from '../../lib/api';

// Types of what the catalog API returns (see server/services/catalog).
export interface PartRow {
  id: number; partNumber: string; category: string; value: string; package: string; manufacturerPartNumber: string;
  supplierId: number | null; supplierName: string | null; unitCostCents: number; leadTimeDays: number; reorderPoint: number;
  binLocation: string; notes: string; onHand: number; reserved: number; available: number; lowStock: boolean;
}
export interface Movement { id: number; created_at: string; part_number: string; kind: string; quantity: number; on_hand_delta: number; reserved_delta: number; reason: string; reference: string; user_name: string | null }
export interface PartsPage extends Page<PartRow> { lowStockTotal: number }
export interface PartsQuery { q: string; category: string; lowStock: boolean; sort: string; dir: 'asc' | 'desc'; page: number; pageSize: number }
export interface Supplier { id: number; name: string }
export interface StringDevice { deviceId: number; name: string; kind: string; presetKey: string | null; is: number; n: number; rs: number; eg: number; xti: number; vfAt1mA: number; vfAt10mA: number; partId?: number | null }
export interface Device extends StringDevice { provenance: string; fitPoints: { vf: number; current: number }[] | null; partNumber: string | null; unitCostCents: number | null; available: number | null }
export interface Cost { partsCents: number; labourMinutes: number; labourCents: number; totalCents: number }
export interface OptionView {
  id: number; code: string; name: string; description: string; topology: 'shunt' | 'feedback' | 'none'; network: NetworkValues; surchargeCents: number;
  positive: StringDevice[]; negative: StringDevice[]; engineInput: { circuit: CircuitSpec; contract: ContractJson } | null;
  published: boolean; position: number; bomDelta: { partId: number; partNumber: string; quantity: number; unitCostCents: number; available: number }[];
  deviceCents: number; flags: string[]; costCents: number | null;
}
export interface RevisionSummary { id: number; number: number; label: string; notes: string; drive: DriveStageValues; frozenAt: string | null; active: boolean; copiedFromRevisionId: number | null; createdAt: string; cost: Cost | null }
export interface ModelDetail {
  id: number; name: string; sku: string; description: string; basePriceCents: number; photoUrl: string | null; published: boolean;
  activeRevision: { id: number; number: number; label: string; drive: DriveStageValues; frozen: boolean } | null;
  options: OptionView[]; cost: Cost | null; labourCentsPerHour: number; revisions: RevisionSummary[];
}
export interface ModelListRow {
  id: number; name: string; sku: string; description: string; basePriceCents: number; photoUrl: string | null; published: boolean; revisionCount: number;
  activeRevision: { id: number; number: number; label: string; frozen: boolean } | null; cost: Cost | null;
  options: { id: number; code: string; name: string; surchargeCents: number; published: boolean; flags: string[] }[];
}
export interface BomLine { id: number; partId: number; partNumber: string; category: string; value: string; quantity: number; designators: string; notes: string; needsLot: boolean; unitCostCents: number; available: number }
export interface Step { id: number; position: number; title: string; instructions: string; standardMinutes: number; skill: string; safetyNote: string; soldering: boolean }
export interface Revision {
  id: number; modelId: number; modelName: string; number: number; label: string; notes: string; drive: DriveStageValues; frozenAt: string | null; frozen: boolean;
  active: boolean; copiedFromRevisionId: number | null; nextNumber: number; lines: BomLine[]; steps: Step[]; cost: Cost; labourCentsPerHour: number;
}
export interface CsvPreview { rows: { row: number; partNumber: string; quantity: number | null; designators: string[]; problems: string[] }[]; total: number; bad: number; ok: boolean }

const qs = (q: PartsQuery) => listSearch({ ...q, q: q.q.trim(), lowStock: q.lowStock || undefined });

// Hierarchical keys: invalidating ['catalog'] refreshes the whole area; narrower keys refresh one part.
export const catalogKeys = {
  all: ['catalog'] as const,
  parts: () => [...catalogKeys.all, 'parts'] as const,
  partList: (q: PartsQuery) => [...catalogKeys.parts(), 'list', q] as const,
  part: (id: number) => [...catalogKeys.parts(), 'detail', id] as const,
  suppliers: () => [...catalogKeys.all, 'suppliers'] as const,
  devices: () => [...catalogKeys.all, 'devices'] as const,
  models: () => [...catalogKeys.all, 'models'] as const,
  model: (id: number) => [...catalogKeys.models(), 'detail', id] as const,
  revision: (id: number) => [...catalogKeys.models(), 'revision', id] as const,
};

export const partsQuery = (q: PartsQuery) => queryOptions({ queryKey: catalogKeys.partList(q), queryFn: () => api.get<PartsPage>(`/api/parts${qs(q)}`), placeholderData: keepPreviousData });
export const partQuery = (id: number) => queryOptions({ queryKey: catalogKeys.part(id), queryFn: () => api.get<{ part: PartRow & { movements: Movement[] } }>(`/api/parts/${id}`).then((b) => b.part) });
export const suppliersQuery = () => queryOptions({ queryKey: catalogKeys.suppliers(), queryFn: () => api.get<{ suppliers: Supplier[] }>('/api/suppliers').then((b) => b.suppliers), staleTime: 60_000 });
/** Every part, for pickers: page after page of the largest size the server gives. */
async function allParts(): Promise<PartRow[]> {
  const rows: PartRow[] = [];
  for (let page = 1; ; page++) {
    const b = await api.get<PartsPage>(`/api/parts${listSearch({ page, pageSize: PAGE_SIZE_MAX })}`);
    rows.push(...b.items);
    if (rows.length >= b.total || b.items.length === 0) return rows;
  }
}
export const allPartsQuery = () => queryOptions({ queryKey: [...catalogKeys.parts(), 'picker'], queryFn: allParts, staleTime: 30_000 });
export const devicesQuery = () => queryOptions({ queryKey: catalogKeys.devices(), queryFn: () => api.get<{ devices: Device[] }>('/api/devices').then((b) => b.devices) });
export const modelsQuery = () => queryOptions({ queryKey: catalogKeys.models(), queryFn: () => api.get<{ models: ModelListRow[] }>('/api/models').then((b) => b.models) });
export const modelQuery = (id: number) => queryOptions({ queryKey: catalogKeys.model(id), queryFn: () => api.get<{ model: ModelDetail }>(`/api/models/${id}`).then((b) => b.model) });
export const revisionQuery = (id: number) => queryOptions({ queryKey: catalogKeys.revision(id), queryFn: () => api.get<{ revision: Revision }>(`/api/revisions/${id}`).then((b) => b.revision) });

export const usePartsPage = (q: PartsQuery) => useQuery(partsQuery(q));
export const usePart = (id: number) => useQuery(partQuery(id));
export const useSuppliers = () => useQuery(suppliersQuery());
export const useAllParts = () => useQuery(allPartsQuery());
export const useDevices = () => useQuery(devicesQuery());
export const useModels = () => useQuery(modelsQuery());
export const useModel = (id: number) => useQuery(modelQuery(id));
export const useRevision = (id: number) => useQuery(revisionQuery(id));

/** A mutation that refreshes the given key prefixes when it succeeds. */
function useCatalogMutation<I, O>(fn: (input: I) => Promise<O>, keys: readonly (readonly unknown[])[] = [catalogKeys.all]) {
  const client = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => Promise.all(keys.map((queryKey) => client.invalidateQueries({ queryKey }))) });
}

export const useCreatePart = () => useCatalogMutation((p: PartInput) => api.post<{ part: PartRow }>('/api/parts', p), [catalogKeys.parts()]);
export const useUpdatePart = (id: number) => useCatalogMutation((p: Partial<PartInput>) => api.patch<{ part: PartRow }>(`/api/parts/${id}`, p), [catalogKeys.parts()]);
export const useAddMovement = (id: number) => useCatalogMutation((m: MovementInput) => api.post<{ stock: { available: number } }>(`/api/parts/${id}/movements`, m), [catalogKeys.all]);
export const useReceive = () => useCatalogMutation((r: ReceiveInput) => api.post<{ received: number; units: number }>('/api/stock/receive', r), [catalogKeys.all]);
export const useCreateDevice = () => useCatalogMutation((d: CustomDeviceInput) => api.post<{ device: Device }>('/api/devices', d), [catalogKeys.devices()]);
export const useLinkDevice = () => useCatalogMutation(({ id, partId }: { id: number; partId: number | null }) => api.patch<{ device: Device }>(`/api/devices/${id}/part`, { partId }), [catalogKeys.all]);
export const useCreateModel = () => useCatalogMutation((m: ModelInput) => api.post<{ model: ModelDetail }>('/api/models', m), [catalogKeys.models()]);
export const useUpdateModel = (id: number) => useCatalogMutation((m: Partial<ModelInput>) => api.patch<{ model: ModelDetail }>(`/api/models/${id}`, m), [catalogKeys.models()]);
export const useUploadPhoto = (id: number) => useCatalogMutation((file: File) => { const f = new FormData(); f.append('photo', file); return api.put<{ model: ModelDetail }>(`/api/models/${id}/photo`, f); }, [catalogKeys.models()]);
export const useCreateOption = (modelId: number) => useCatalogMutation((o: OptionInput) => api.post<{ optionId: number; model: ModelDetail }>(`/api/models/${modelId}/options`, o), [catalogKeys.models()]);
export const useUpdateOption = (id: number) => useCatalogMutation((o: Partial<OptionInput>) => api.patch<{ model: ModelDetail }>(`/api/options/${id}`, o), [catalogKeys.models()]);
export const useStartRevision = (modelId: number) => useCatalogMutation((fromRevisionId: number) => api.post<{ revision: Revision }>(`/api/models/${modelId}/revisions`, { fromRevisionId }), [catalogKeys.models()]);
export const useActivateRevision = () => useCatalogMutation((id: number) => api.post<{ revision: Revision }>(`/api/revisions/${id}/activate`), [catalogKeys.models()]);
export const useUpdateRevision = (id: number) => useCatalogMutation((d: DriveStageInput) => api.patch<{ revision: Revision }>(`/api/revisions/${id}`, d), [catalogKeys.models()]);
export const useAddBomLine = (id: number) => useCatalogMutation((l: BomLineInput) => api.post<{ revision: Revision }>(`/api/revisions/${id}/bom-lines`, l), [catalogKeys.models()]);
export const useDeleteBomLine = () => useCatalogMutation((lineId: number) => api.delete<{ revision: Revision }>(`/api/bom-lines/${lineId}`), [catalogKeys.models()]);
export const useAddStep = (id: number) => useCatalogMutation((s: BuildStepInput) => api.post<{ revision: Revision }>(`/api/revisions/${id}/steps`, s), [catalogKeys.models()]);
export const useDeleteStep = () => useCatalogMutation((stepId: number) => api.delete<{ revision: Revision }>(`/api/steps/${stepId}`), [catalogKeys.models()]);
const csvForm = (file: File) => { const f = new FormData(); f.append('file', file); return f; };
export const usePreviewBomCsv = (id: number) => useMutation({ mutationFn: (file: File) => api.post<CsvPreview>(`/api/revisions/${id}/bom-csv/preview`, csvForm(file)) });
export const useImportBomCsv = (id: number) => useCatalogMutation((file: File) => api.post<{ revision: Revision }>(`/api/revisions/${id}/bom-csv/import`, csvForm(file)), [catalogKeys.models()]);
export const useUpdateBomLine = () => useCatalogMutation(({ id, ...l }: BomLineInput & { id: number }) => api.patch<{ revision: Revision }>(`/api/bom-lines/${id}`, l), [catalogKeys.models()]);
export const useUpdateStep = () => useCatalogMutation(({ id, ...s }: BuildStepInput & { id: number }) => api.patch<{ revision: Revision }>(`/api/steps/${id}`, s), [catalogKeys.models()]);
