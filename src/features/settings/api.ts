import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { OwnerSettings, SettingsPatch } from '../../../shared/schemas/settings';
import { api } from '../../lib/api';
import { publicSettingsQuery } from '../../lib/format';

export const settingsKeys = { all: ['settings'] as const, owner: () => ['settings', 'owner'] as const };

export const ownerSettingsQuery = () => queryOptions({ queryKey: settingsKeys.owner(), queryFn: () => api.get<OwnerSettings>('/api/settings') });
export const useOwnerSettings = () => useQuery(ownerSettingsQuery());

/** After any change the owner's view and the public settings (name, locale, logo) are fetched again. */
function useSettingsMutation<I>(fn: (input: I) => Promise<OwnerSettings>) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: fn,
    onSuccess: (data) => {
      client.setQueryData(settingsKeys.owner(), data);
      void client.invalidateQueries({ queryKey: publicSettingsQuery().queryKey });
    },
  });
}

export const useSaveSettings = () => useSettingsMutation((patch: SettingsPatch) => api.patch<OwnerSettings>('/api/settings', patch));
export const useUploadLogo = () => useSettingsMutation((file: File) => { const f = new FormData(); f.append('logo', file); return api.put<OwnerSettings>('/api/settings/logo', f); });
export const useRemoveLogo = () => useSettingsMutation(() => api.delete<OwnerSettings>('/api/settings/logo'));
