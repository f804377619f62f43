// The bare baseline for benchmarks: Express 5 with its JSON body parser and nothing else (plain
// JavaScript run by plain Node, as the API's bundle is).
import express from 'express';

const app = express();
app.use(express.json());
app.get('/echo', (_req, res) => void res.json({ ok: true }));
app.post('/echo', (req, res) => void res.status(201).json({ received: req.body }));
const server = app.listen(Number(process.env['PORT']), process.env['HOST'] ?? '127.0.0.1');
process.once('SIGTERM', () => server.close(() => process.exit(0)));
