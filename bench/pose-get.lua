-- wrk script: GET the latest pose of a random vehicle among fleet-0 .. fleet-999.
-- Run: wrk -t2 -c16 -d10s --latency -s bench/pose-get.lua http://127.0.0.1:8470
math.randomseed(7)
request = function()
  return wrk.format("GET", "/v1/vehicles/fleet-" .. math.random(0, 999) .. "/pose")
end
