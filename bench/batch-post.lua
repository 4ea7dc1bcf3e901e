-- wrk script: batch NDJSON ingest. Each wrk thread has one connection (run with -c equal to -t), so
-- its requests go strictly one after another; each thread feeds its own vehicle the log's lines in
-- bodies of LINES lines, in order, and moves to a new vehicle when the log is used up (a second pass
-- into the same vehicle would be rejected as late).
-- Run: wrk -t2 -c2 -d10s --latency -s bench/batch-post.lua http://127.0.0.1:18471 -- LOG.ndjson [LINES]
-- The summary line counts only replies with "rejected_count":0; any other reply is reported.
local threads = {}
local counter = 0

setup = function(thread)
  counter = counter + 1
  thread:set("tid", counter)
  table.insert(threads, thread)
end

init = function(args)
  local path = args[1] or error("usage: ... -- LOG.ndjson [LINES]")
  lines_per_body = tonumber(args[2] or "1650")
  bodies = {}
  local buf, n = {}, 0
  for line in io.lines(path) do
    if line:match("%S") then
      n = n + 1
      buf[n] = line
      if n == lines_per_body then
        table.insert(bodies, table.concat(buf, "\n") .. "\n")
        buf, n = {}, 0
      end
    end
  end
  if #bodies == 0 then error(path .. ": fewer than " .. lines_per_body .. " lines") end
  next_body = 0
  pass = 0
  good = 0
  bad = 0
  run = tostring(os.time())
end

request = function()
  local i = next_body % #bodies
  pass = math.floor(next_body / #bodies)
  next_body = next_body + 1
  local vehicle = "batch-" .. run .. "-" .. tid .. "-" .. pass
  return wrk.format("POST", "/v1/vehicles/" .. vehicle .. "/samples",
    {["Content-Type"] = "application/x-ndjson"}, bodies[i + 1])
end

response = function(status, headers, body)
  if status == 200 and body:find('"rejected_count":0', 1, true) then
    good = good + 1
  else
    bad = bad + 1
    if bad <= 3 then io.stderr:write("reply " .. status .. ": " .. body:sub(1, 300) .. "\n") end
  end
end

done = function(summary, latency, requests)
  local good_total, bad_total, per = 0, 0, 0
  for _, t in ipairs(threads) do
    good_total = good_total + t:get("good")
    bad_total = bad_total + t:get("bad")
    per = t:get("lines_per_body")
  end
  local seconds = summary.duration / 1e6
  io.write(string.format("batch ingest: %d bodies of %d samples with no rejection in %.1f s = %.0f samples/s; %d other replies\n",
    good_total, per, seconds, good_total * per / seconds, bad_total))
end
