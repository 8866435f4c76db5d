// The request handler for pages and the JSON API. In development Vite loads this file on every
// request (so route edits apply at once); in production it is the server build's entry.
import { createRequestHandler } from "@react-router/express";
import type { RequestHandler } from "express";
import { RouterContextProvider } from "react-router";
import { nonceContext, servicesContext } from "~/context";
import type { Services } from "~/services.server";

export function createAppHandler(services: Services): RequestHandler {
  return createRequestHandler({
    build: () => import("virtual:react-router/server-build"),
    mode: services.env.NODE_ENV === "production" ? "production" : "development",
    getLoadContext(_req, res) {
      const context = new RouterContextProvider();
      context.set(servicesContext, services);
      context.set(nonceContext, res.locals.cspNonce as string);
      return context;
    },
  });
}
