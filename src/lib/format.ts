import { useQuery } from '@tanstack/react-query';
import type { ReactNode } from 'react';
import { createFormatter, type Formatter } from '../../shared/format';
import { api } from './api';

import type { PublicSettings } from '../../shared/schemas/settings';

export type { PublicSettings };

// The browser's side of the one formatter (shared/format.ts): bound to the shop's locale, time
// zone and currency from GET /api/settings/public. Until they have loaded it formats as 'en-GB'.

export const publicSettingsQuery = () => ({
  queryKey: ['settings', 'public'] as const,
  queryFn: () => api.get<PublicSettings>('/api/settings/public'),
  staleTime: 10 * 60_000,
});

export const usePublicSettings = () => useQuery(publicSettingsQuery());

let current: Formatter = createFormatter();
let currentSettings: PublicSettings | undefined;

function formatterFor(settings: PublicSettings | undefined): Formatter {
  if (settings && settings !== currentSettings) {
    currentSettings = settings;
    current = createFormatter(settings);
  }
  return current;
}

/** The shop's formatter in a component: dates, times, money and numbers (see shared/format.ts). */
export function useFormatters(): Formatter {
  return formatterFor(usePublicSettings().data);
}

/** The same formatter for code outside components (unit helpers, chart ticks, toasts). */
export const shopFormat = (): Formatter => current;

/** Loads the shop's settings at the root, so the whole tree formats again once they arrive. */
export function ShopFormat({ children }: { children: ReactNode }) {
  useFormatters();
  return children;
}
