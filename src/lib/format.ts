import { useQuery } from '@tanstack/react-query';
import { api } from './api';

export interface PublicSettings {
  shopName: string;
  shopEmail: string;
  currency: string;
  timeZone: string;
}

export const publicSettingsQuery = () => ({
  queryKey: ['settings', 'public'] as const,
  queryFn: () => api.get<PublicSettings>('/api/settings/public'),
  staleTime: 10 * 60_000,
});

export const usePublicSettings = () => useQuery(publicSettingsQuery());

/** Money from integer cents in the shop's currency. */
export function formatMoney(cents: number, currency = 'EUR') {
  return new Intl.NumberFormat('en-GB', { style: 'currency', currency }).format(cents / 100);
}

/** A date and time in the shop's time zone. */
export function formatDateTime(iso: string | Date, timeZone = 'Europe/Berlin') {
  return new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeStyle: 'short', timeZone }).format(new Date(iso));
}

export function formatDate(iso: string | Date, timeZone = 'Europe/Berlin') {
  return new Intl.DateTimeFormat('en-GB', { dateStyle: 'medium', timeZone }).format(new Date(iso));
}

/** Hooks that format with the shop's settings once they have loaded. */
export function useFormatters() {
  const settings = usePublicSettings().data;
  const currency = settings?.currency ?? 'EUR';
  const timeZone = settings?.timeZone ?? 'Europe/Berlin';
  return {
    money: (cents: number) => formatMoney(cents, currency),
    dateTime: (iso: string | Date) => formatDateTime(iso, timeZone),
    date: (iso: string | Date) => formatDate(iso, timeZone),
  };
}
