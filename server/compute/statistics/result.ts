/** The shape every statistic returns: a value (or null with a reason), its method and parameters. */

export type ParameterValue = number | string | boolean | null

export interface StatisticResult<T> {
  /** null when the statistic cannot be computed; `reason` then says why in plain words. */
  value: T | null
  method: string
  parameters: Record<string, ParameterValue>
  reason?: string
}

export function computed<T>(
  value: T,
  method: string,
  parameters: Record<string, ParameterValue>,
): StatisticResult<T> {
  return { value, method, parameters }
}

export function notComputable<T>(
  reason: string,
  method: string,
  parameters: Record<string, ParameterValue>,
): StatisticResult<T> {
  return { value: null, method, parameters, reason }
}
