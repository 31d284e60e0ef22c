import { createContext, useContext } from "react";

/**
 * The per-response script nonce (app/entry.server.tsx makes one for each page). Scripts React Router writes
 * into the page carry it, so the Content-Security-Policy can refuse every other inline script. In the
 * browser it is undefined: browsers hide nonce values from the page, and hydrated scripts do not run again.
 */
export const NonceContext = createContext<string | undefined>(undefined);

export function useNonce(): string | undefined {
  return useContext(NonceContext);
}
