-- wrk script: POST the invented demo scenario to /v1/screenings.
--   wrk -t2 -c32 -d30s -s cmd/loadtest/demo.lua http://127.0.0.1:8080/v1/screenings
-- Run from the module root (the body is read from testdata/demo).
wrk.method = "POST"
wrk.headers["Content-Type"] = "application/json"
local f = assert(io.open("testdata/demo/scenario.json", "rb"))
wrk.body = f:read("*a")
f:close()

function done(summary, latency, requests)
  io.write(string.format("p50 %.2f ms, p90 %.2f ms, p99 %.2f ms, max %.2f ms\n",
    latency:percentile(50) / 1000, latency:percentile(90) / 1000,
    latency:percentile(99) / 1000, latency.max / 1000))
  io.write(string.format("errors: connect %d, read %d, write %d, status %d, timeout %d\n",
    summary.errors.connect, summary.errors.read, summary.errors.write,
    summary.errors.status, summary.errors.timeout))
end
