// A worker thread of `npm run bench:liveness` (plain JavaScript: worker threads start without tsx),
// so that neither the probe nor the heavy client shares the server's event loop:
// - role `health`: GET `url` every `everyMs` until told to stop, then posts every latency (ms);
// - role `request`: sends one request, reads the whole answer, posts status, time and size;
// - role `client`: stays up and sends each request it is posted ({ id, url, … }), answering with the
//   same fields and the id (a thread per request would cost more than the requests).
import { parentPort, workerData } from 'node:worker_threads'

const data = workerData

if (data.role === 'health') {
  let stop = false
  parentPort.once('message', () => { stop = true })
  const latencies = []
  let errors = 0
  while (!stop && latencies.length < data.maxSamples) {
    const t0 = performance.now()
    try {
      const res = await fetch(data.url)
      await res.arrayBuffer()
      if (res.status !== 200) errors++
    } catch { errors++ }
    latencies.push(performance.now() - t0)
    await new Promise((ok) => setTimeout(ok, data.everyMs))
  }
  parentPort.postMessage({ latencies, errors })
} else if (data.role === 'client') {
  parentPort.on('message', async (req) => {
    if (req === 'stop') { parentPort.close(); return }
    try {
      parentPort.postMessage({ id: req.id, ...(await send(req)) })
    } catch (err) {
      parentPort.postMessage({ id: req.id, status: 0, ms: 0, bytes: 0, json: null, error: String(err) })
    }
  })
} else {
  parentPort.postMessage(await send(data))
}

async function send(req) {
  const t0 = performance.now()
  const res = await fetch(req.url, { method: req.method, headers: req.headers, body: req.body })
  const body = Buffer.from(await res.arrayBuffer())
  const ms = performance.now() - t0
  // small answers come back whole (ids of jobs, problem documents); large ones only by size, unless asked for (`whole`)
  return { status: res.status, ms, bytes: body.byteLength, json: req.whole || body.byteLength < 100_000 ? body.toString('utf8') : null }
}
