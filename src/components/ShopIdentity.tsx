import { usePublicSettings } from '../lib/format';

/**
 * The shop's own name and logo (from its settings), for the pages customers and visitors see:
 * the storefront, sign-in and registration. "Kneepoint" names the software only inside the staff app.
 */
export function ShopIdentity({ size = 'md' }: { size?: 'md' | 'lg' }) {
  const settings = usePublicSettings().data;
  const name = settings?.shopName ?? '';
  return (
    <span className="flex items-center gap-3">
      {settings?.logoUrl ? <img src={settings.logoUrl} alt="" className={`${size === 'lg' ? 'max-h-12' : 'max-h-9'} max-w-32 rounded bg-white p-0.5`} /> : null}
      <span className={`${size === 'lg' ? 'text-3xl' : 'text-xl'} font-bold tracking-tight`}>{name || '\u00a0'}</span>
    </span>
  );
}
