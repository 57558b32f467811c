import type { ErrorBody } from "./errors";

/** An API error as the client sees it: the envelope's code, message and field issues. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly body: ErrorBody["error"],
  ) {
    super(body.message);
    this.name = "ApiError";
  }
}

export async function fetchJson<T>(url: string, init?: RequestInit): Promise<T> {
  const res = await fetch(url, {
    ...init,
    headers: {
      accept: "application/json",
      ...(init?.body ? { "content-type": "application/json" } : {}),
      ...init?.headers,
    },
  });
  const text = await res.text();
  const body = text ? JSON.parse(text) : null;
  if (!res.ok) {
    throw new ApiError(res.status, body?.error ?? { code: "internal", message: `The server answered ${res.status}.` });
  }
  return body as T;
}
