import { createFormatter, type Formatter } from '../../shared/format';
import type { ShopSettings } from './settings';

const formatters = new Map<string, Formatter>();

/**
 * The server's side of the one formatter (shared/format.ts), bound to the shop's settings row:
 * mails, PDFs and the public verify page write dates, money and numbers with it, exactly as
 * the screens do. Without a `locale` in the settings it formats as 'en-GB'.
 */
export function shopFormatter(settings: Pick<ShopSettings, 'currency' | 'time_zone' | 'locale'>): Formatter {
  // Made once per combination and kept: making Intl formatters costs far more than using them.
  const key = `${settings.locale ?? ''}|${settings.time_zone}|${settings.currency}`;
  let formatter = formatters.get(key);
  if (!formatter) formatters.set(key, (formatter = createFormatter({ locale: settings.locale, timeZone: settings.time_zone, currency: settings.currency })));
  return formatter;
}
