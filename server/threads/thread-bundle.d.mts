/** The URL of the compiled bundle of a TypeScript thread entry (see thread-bundle.mjs). */
export function bundledEntry(entryHref: string): Promise<string>
