// `npm run build:api`: the API's production bundle, dist/api/main.mjs (run it with `node dist/api/main.mjs`).
import { buildApiBundle } from './lib/api-bundle';

console.log(`[setwright] built ${await buildApiBundle()}`);
