/**
 * The part of Express 4 and compression that scripts/web.ts uses. Neither ships its own types and
 * their @types packages are not among the dependencies; @react-router/express's types name these.
 */
declare module "express" {
  import type { IncomingMessage, ServerResponse } from "node:http";

  export type Request = IncomingMessage;
  export type Response = ServerResponse;
  export type NextFunction = (error?: unknown) => void;
  export type Handler = (request: Request, response: Response, next: NextFunction) => unknown;
  export type Application = ((request: Request, response: Response, next?: NextFunction) => void) & {
    disable(setting: string): Application;
    use(handler: Handler): Application;
    use(path: string, handler: Handler): Application;
    all(path: string, handler: Handler): Application;
  };
  type StaticOptions = { immutable?: boolean; maxAge?: string | number };

  const express: { (): Application; static(root: string, options?: StaticOptions): Handler };
  export default express;
}

declare module "compression" {
  import type { Handler } from "express";

  export default function compression(): Handler;
}
