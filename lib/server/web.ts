/** Entry of `npm run web`: the web app alone (the ingester runs as `npm run ingest`). */
import { runProduct } from './product';

await runProduct('web');
