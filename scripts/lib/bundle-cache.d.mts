export function cachedBundle(root: string, name: string, entry: string, dirs: string[]): string | null;
