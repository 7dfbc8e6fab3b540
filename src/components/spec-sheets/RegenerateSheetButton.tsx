import { ConfirmButton } from '../ui/ConfirmButton';
import { useToast } from '../ui/toast';
import { useRegenerateSheet } from './api';

/** Makes a passed unit's stored sheet again from today's data; asks first, since the stored sheet is replaced (and the change logged). */
export function RegenerateSheetButton({ serial }: { serial: string }) {
  const regenerate = useRegenerateSheet(serial);
  const toast = useToast();
  return (
    <ConfirmButton
      variant="secondary"
      label="Make the sheet again"
      question={`Make the spec sheet of ${serial} again from today's data? The stored sheet is replaced (the old file stays on record) and the change goes into the unit's history.`}
      confirmLabel="Make it again"
      busy={regenerate.isPending}
      onConfirm={() => regenerate.mutate(undefined, {
        onSuccess: (r) => toast(`Spec sheet of ${r.serial} made again (version ${r.version})`),
        onError: (e) => toast(e instanceof Error ? e.message : 'The sheet could not be made again', 'alarm'),
      })}
    />
  );
}
