// Client-side JSON fetch for SWR and forms: turns the API's error body into a thrown error.
export type ApiErrorBody = { error: { code: string; message: string; issues?: { path: string; message: string }[] } };

export class ApiRequestError extends Error {
  constructor(public status: number, public body: ApiErrorBody['error']) {
    super(body.message);
  }
}

export async function apiFetch<T>(url: string, init?: RequestInit): Promise<T> {
  const res = await fetch(url, {
    ...init,
    headers: { 'content-type': 'application/json', ...(init?.headers ?? {}) },
  });
  const text = await res.text();
  const data = text ? JSON.parse(text) : null;
  if (!res.ok) {
    throw new ApiRequestError(res.status, data?.error ?? { code: 'http_error', message: `The server answered ${res.status}.` });
  }
  return data as T;
}

export const swrFetcher = <T,>(url: string) => apiFetch<T>(url);
