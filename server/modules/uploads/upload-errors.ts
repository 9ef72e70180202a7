/** tus hooks refuse by throwing { status_code, body }; our bodies are problem+json, like the API's. */
export function refuse(
  status: number,
  title: string,
  detail: string,
  extra: { type?: string } & Record<string, unknown> = {},
): { status_code: number; body: string } {
  return {
    status_code: status,
    body: JSON.stringify({ type: '/problems/upload', title, status, detail, ...extra }),
  }
}

/** The problem type of an upload identical to a file already in the dataset; clients may treat it as done. */
export const DUPLICATE_FILE_PROBLEM = '/problems/duplicate-file'
