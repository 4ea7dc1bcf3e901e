-- wrk script: one wheel-speed sample per POST, each connection its own vehicle with a rising clock.
-- Run: wrk -t2 -c8 -d10s --latency -s bench/single-post.lua http://127.0.0.1:8470
-- Each run starts its clock at the wall-clock second it starts, so a rerun never posts into the past
-- of vehicles fed by an earlier run (which the service would rightly reject as late).
local counter = 0
local id = 0
local t0 = os.time()
setup = function(thread)
  id = id + 1
  thread:set("vehicle", "single-" .. id .. "-" .. os.time())
end
request = function()
  counter = counter + 1
  local body = string.format('{"type":"wheel_speed","t":%.2f,"speed":5.0}\n', t0 + 0.02 * counter)
  return wrk.format("POST", "/v1/vehicles/" .. vehicle .. "/samples",
    {["Content-Type"] = "application/x-ndjson"}, body)
end
