/** Every answer carries the request's id (x-request-id), the one a client quotes when reporting a problem. */
import fp from 'fastify-plugin';
import { FASTIFY_VERSION, PLUGIN } from './names.js';

export const requestIdPlugin = fp(
  async (app) => {
    app.addHook('onRequest', async (request, reply) => {
      reply.header('x-request-id', request.id);
    });
  },
  { name: PLUGIN.requestId, fastify: FASTIFY_VERSION },
);
