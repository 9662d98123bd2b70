/** Hash routes, so a reload comes back to the same screen: `#/` (choose reader), `#/read/<code>`. */
export type Route = { name: 'home' } | { name: 'read'; reader: string } | { name: 'coordinator' } | { name: 'analysis' } | { name: 'agreement' };

function parse(hash: string): Route {
  if (hash === '#/coordinator') return { name: 'coordinator' };
  if (hash === '#/analysis') return { name: 'analysis' };
  if (hash === '#/analysis/agreement') return { name: 'agreement' };
  const m = /^#\/read\/([^/]+)$/.exec(hash);
  return m ? { name: 'read', reader: decodeURIComponent(m[1]) } : { name: 'home' };
}

class RouteStore {
  current = $state<Route>(parse(window.location.hash));
  constructor() {
    window.addEventListener('hashchange', () => { this.current = parse(window.location.hash); });
  }
  go(route: Route): void {
    window.location.hash = route.name === 'read' ? `#/read/${encodeURIComponent(route.reader)}` : route.name === 'coordinator' ? '#/coordinator' : route.name === 'analysis' ? '#/analysis' : route.name === 'agreement' ? '#/analysis/agreement' : '#/';
  }
}

export const route = new RouteStore();
