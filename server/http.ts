import { Router, type RequestHandler } from "express";
import { can, type Permission, type Role } from "./permissions.ts";
import { forbidden, unauthorized } from "./errors.ts";

export interface SessionUser {
  id: number;
  email: string;
  name: string;
  role: Role;
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      user?: SessionUser;
    }
  }
}

export type Method = "get" | "post" | "put" | "patch" | "delete";
export interface RouteSpec {
  method: Method;
  path: string;
  permission: Permission | "public";
}

/** Every guarded route, as registered: the role × route test reads this. */
export const routeRegistry: RouteSpec[] = [];

export function requirePermission(permission: Permission): RequestHandler {
  return (req, _res, next) => {
    if (!req.user) return next(unauthorized());
    if (!can(req.user.role, permission)) return next(forbidden());
    next();
  };
}

/**
 * A router whose every route declares the permission it needs. `prefix` is where the router is mounted,
 * used only to record full paths in the registry.
 */
export function guardedRouter(prefix: string) {
  const router = Router();
  const add =
    (method: Method) =>
    (path: string, permission: Permission | "public", ...handlers: RequestHandler[]) => {
      const full = (prefix + path).replace(/\/+$/, "") || "/";
      if (!routeRegistry.some((r) => r.method === method && r.path === full)) routeRegistry.push({ method, path: full, permission });
      const guard = permission === "public" ? [] : [requirePermission(permission)];
      router[method](path, ...guard, ...handlers);
      return api;
    };
  const api = { router, get: add("get"), post: add("post"), put: add("put"), patch: add("patch"), delete: add("delete") };
  return api;
}
