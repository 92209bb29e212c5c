/** Entry of `npm start` (after the build check in bin/start.mjs): the whole product in one process. */
import { runProduct } from './product';

await runProduct('all');
