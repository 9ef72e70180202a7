-- Prints latency percentiles (microseconds) and totals as one JSON line for the benchmark runner.
done = function(summary, latency, requests)
  io.write(string.format(
    'WRK {"requests":%d,"durationUs":%d,"errors":%d,"non2xx":%d,"p50":%d,"p95":%d,"p99":%d,"max":%d}\n',
    summary.requests, summary.duration,
    summary.errors.connect + summary.errors.read + summary.errors.write + summary.errors.timeout,
    summary.errors.status,
    latency:percentile(50), latency:percentile(95), latency:percentile(99), latency.max))
end
