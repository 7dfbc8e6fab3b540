import { useQuery } from '@tanstack/react-query';
import { api } from './api';

import type { PublicSettings } from '../../shared/schemas/settings';

export type { PublicSettings };

export const publicSettingsQuery = () => ({
  queryKey: ['settings', 'public'] as const,
  queryFn: () => api.get<PublicSettings>('/api/settings/public'),
  staleTime: 10 * 60_000,
});

export const usePublicSettings = () => useQuery(publicSettingsQuery());

/** Money from integer cents in the shop's currency, written the shop's way (its BCP 47 locale). */
export function formatMoney(cents: number, currency = 'EUR', locale = 'en-GB') {
  return new Intl.NumberFormat(locale, { style: 'currency', currency }).format(cents / 100);
}

/** A date and time in the shop's time zone. */
export function formatDateTime(iso: string | Date, timeZone = 'Europe/Berlin', locale = 'en-GB') {
  return new Intl.DateTimeFormat(locale, { dateStyle: 'medium', timeStyle: 'short', timeZone }).format(new Date(iso));
}

export function formatDate(iso: string | Date, timeZone = 'Europe/Berlin', locale = 'en-GB') {
  return new Intl.DateTimeFormat(locale, { dateStyle: 'medium', timeZone }).format(new Date(iso));
}

/** Hooks that format with the shop's settings once they have loaded. */
export function useFormatters() {
  const settings = usePublicSettings().data;
  const currency = settings?.currency ?? 'EUR';
  const timeZone = settings?.timeZone ?? 'Europe/Berlin';
  const locale = settings?.locale ?? 'en-GB';
  return {
    money: (cents: number) => formatMoney(cents, currency, locale),
    dateTime: (iso: string | Date) => formatDateTime(iso, timeZone, locale),
    date: (iso: string | Date) => formatDate(iso, timeZone, locale),
  };
}
