// Lets worker threads started from tests load the TypeScript sources directly.
import { register } from 'node:module';
register('./ts-hooks.mjs', import.meta.url);
