/**
 * The renderer's one way to reach Veil: the Electron bridge when present, else the localhost
 * host with the token of this launch (taken from the URL once, then kept for this tab only).
 */
import { OPERATIONS, type OperationName, type VeilApi } from '../../app/api-contract.ts';

declare global {
  interface Window { veil?: VeilApi }
}

const TOKEN_KEY = 'veil.token';

function takeToken(): string | null {
  const url = new URL(window.location.href);
  const fromUrl = url.searchParams.get('token');
  if (fromUrl) {
    sessionStorage.setItem(TOKEN_KEY, fromUrl);
    url.searchParams.delete('token');
    history.replaceState(null, '', url.pathname + url.search + url.hash);
    return fromUrl;
  }
  return sessionStorage.getItem(TOKEN_KEY);
}

function httpClient(): VeilApi {
  const token = takeToken();
  const call = async (op: OperationName, arg?: unknown): Promise<unknown> => {
    const res = await fetch(`/api/${op}`, {
      method: 'POST',
      headers: { 'Content-Type': 'application/json', Authorization: `Bearer ${token ?? ''}` },
      body: arg === undefined ? '' : JSON.stringify(arg),
    });
    const type = res.headers.get('content-type') ?? '';
    if (!res.ok) {
      const msg = type.includes('json') ? ((await res.json()) as { error?: string }).error : await res.text();
      throw new Error(msg || `${op} failed (${res.status})`);
    }
    return type.includes('octet-stream') ? res.arrayBuffer() : res.json();
  };
  return Object.fromEntries(OPERATIONS.map((op) => [op, (arg?: unknown) => call(op, arg)])) as unknown as VeilApi;
}

export const api: VeilApi = window.veil ?? httpClient();
