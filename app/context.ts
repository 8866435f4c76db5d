import { createContext, type RouterContextProvider } from "react-router";
import type { Services } from "./services.server";

/** The server's services, set once per request by the Express entry (server/app.ts). */
export const servicesContext = createContext<Services>();

export const services = (context: Readonly<RouterContextProvider>) => context.get(servicesContext);

/** Per-request CSP nonce, so the inline hydration scripts run while other inline scripts don't. */
export const nonceContext = createContext<string>("");
