/** Small pieces every Garage route uses: validated params and search params. */
import { data } from "react-router";
import { z } from "zod";
import { unitSystemOf } from "../lib/garage/form-data";
import type { UnitSystem } from "../lib/garage/units";

const id = z.string().min(1).max(36).regex(/^[A-Za-z0-9-]+$/);

/** Route params named in `keys`, each an id; anything else is a 404 (never a hint that it exists). */
export function ids<K extends string>(params: Record<string, string | undefined>, ...keys: K[]): Record<K, string> {
  const out = {} as Record<K, string>;
  for (const key of keys) {
    const parsed = id.safeParse(params[key]);
    if (!parsed.success) throw data("Not found.", { status: 404 });
    out[key] = parsed.data;
  }
  return out;
}

/** `?units=imperial` for pages that show stored values. */
export function displayUnits(request: Request): UnitSystem {
  return unitSystemOf(new URL(request.url).searchParams.get("units"));
}

export function searchParamsOf<T extends z.ZodType>(request: Request, schema: T): z.output<T> {
  const params = Object.fromEntries(new URL(request.url).searchParams);
  const parsed = schema.safeParse(params);
  return parsed.success ? parsed.data : schema.parse({});
}
