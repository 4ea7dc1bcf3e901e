# Seeds vehicles fleet-0 .. fleet-N-1 with the first 2 s of a log, for the pose GET benchmark.
# Run: python3 bench/seed-fleet.py LOG.ndjson [N] [BASE_URL]
import sys, urllib.request
log, n = sys.argv[1], int(sys.argv[2]) if len(sys.argv) > 2 else 1000
base = sys.argv[3] if len(sys.argv) > 3 else "http://127.0.0.1:8470"
lines = []
with open(log) as f:
    t0 = None
    for line in f:
        t = float(line.split('"t":')[1].split(',')[0].split('}')[0])
        t0 = t if t0 is None else t0
        if t - t0 >= 2.0:
            break
        lines.append(line)
body = "".join(lines).encode()
for i in range(n):
    req = urllib.request.Request(f"{base}/v1/vehicles/fleet-{i}/samples", data=body,
                                 headers={"Content-Type": "application/x-ndjson"})
    urllib.request.urlopen(req).read()
print(f"seeded {n} vehicles with {len(lines)} samples each")
