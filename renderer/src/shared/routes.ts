// Where the window is: a small hash router, so the desktop (file://) and browser mode share one
// URL scheme without a server-side route. Each view is one entry; later views add one more.

export type Route =
  | { view: 'register' }
  | { view: 'meter'; assetId: string }
  | { view: 'check'; checkId: number }
  | { view: 'record'; assetId?: string; draftId?: number }
  | { view: 'use' }
  | { view: 'standards' }
  | { view: 'settings' }
  | { view: 'documents' }
  | { view: 'missing'; hash: string };

export function parseRoute(hash: string): Route {
  const parts = hash
    .replace(/^#\/?/, '')
    .split('/')
    .filter(Boolean)
    .map((p) => {
      try {
        return decodeURIComponent(p);
      } catch {
        return p;
      }
    });
  const [head, arg, extra] = parts;
  switch (head) {
    case undefined:
    case 'register':
      return { view: 'register' };
    case 'meter':
      return arg ? { view: 'meter', assetId: arg } : { view: 'register' };
    case 'check':
      return arg && /^\d+$/.test(arg) ? { view: 'check', checkId: Number(arg) } : { view: 'missing', hash };
    case 'record':
      if (arg === 'draft' && extra && /^\d+$/.test(extra)) return { view: 'record', draftId: Number(extra) };
      return arg ? { view: 'record', assetId: arg } : { view: 'record' };
    case 'use':
      return { view: 'use' };
    case 'standards':
      return { view: 'standards' };
    case 'settings':
      return { view: 'settings' };
    case 'documents':
      return { view: 'documents' };
    default:
      return { view: 'missing', hash };
  }
}

export const href = {
  register: () => '#/register',
  meter: (assetId: string) => `#/meter/${encodeURIComponent(assetId)}`,
  check: (checkId: number) => `#/check/${checkId}`,
  record: (assetId?: string) => (assetId ? `#/record/${encodeURIComponent(assetId)}` : '#/record'),
  draft: (draftId: number) => `#/record/draft/${draftId}`,
  use: () => '#/use',
  standards: () => '#/standards',
  settings: () => '#/settings',
  documents: () => '#/documents',
};

/** The tab a route belongs to, for the navigation bar. */
export function section(
  route: Route,
): 'register' | 'record' | 'use' | 'standards' | 'documents' | 'settings' | null {
  switch (route.view) {
    case 'register':
    case 'meter':
    case 'check':
      return 'register';
    case 'record':
      return 'record';
    case 'use':
      return 'use';
    case 'standards':
      return 'standards';
    case 'documents':
      return 'documents';
    case 'settings':
      return 'settings';
    default:
      return null;
  }
}
