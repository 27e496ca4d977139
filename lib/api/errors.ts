export type ApiIssue = { path: string; message: string };

/** The one error type route handlers and server code throw; the wrapper maps it to JSON. */
export class ApiError extends Error {
  constructor(
    public status: 400 | 401 | 403 | 404 | 409 | 413 | 415 | 422 | 429 | 500 | 502 | 503,
    public code: string,
    message: string,
    public issues?: ApiIssue[],
  ) {
    super(message);
  }
}

export const notFound = (what: string) => new ApiError(404, 'not_found', `${what} was not found.`);
export const forbidden = (message = 'Your role does not allow this.') => new ApiError(403, 'forbidden', message);
export const conflict = (message: string) => new ApiError(409, 'conflict', message);
export const invalid = (message: string, issues?: ApiIssue[]) => new ApiError(422, 'invalid_input', message, issues);

/** For pages: a 404 from db/queries becomes null (the page calls notFound()); any other error still reaches error.tsx. */
export function nullIfNotFound<T>(p: Promise<T>): Promise<T | null> {
  return p.catch((err: unknown) => {
    if (err instanceof ApiError && err.status === 404) return null;
    throw err;
  });
}
