import { extendZodWithOpenApi } from '@asteasolutions/zod-to-openapi';
import { z } from 'zod';

/** zod with `.openapi()`; every schema module of the document imports z from here, so the extension is in place first. */
extendZodWithOpenApi(z);

export { z };
