/** GET a JSON route; a non-2xx answer throws with the route's own error sentence. */
export async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" } });
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { error?: string } | null;
    throw new Error(body?.error ?? `${url} answered ${res.status}`);
  }
  return (await res.json()) as T;
}
