import express, { type RequestHandler, type Request } from 'express';
import type { Role } from '#shared/roles.ts';
import { AppError } from './errors.ts';
import type { User } from '../modules/auth/user.entity.ts';

/**
 * Who may call a route. Every route states one: there is no way to add a route without it,
 * so a forgotten check cannot leave a route open (default deny).
 */
export type Access = 'public' | 'signed-in' | readonly Role[];

export interface RouteRecord {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  path: string;
  access: Access;
}

/** Every route registered through featureRouter(), for the role × route table test and the docs. */
export const routeTable: RouteRecord[] = [];

export function guard(access: Access): RequestHandler {
  return (req, _res, next) => {
    if (access === 'public') return next();
    if (!req.user) throw AppError.unauthenticated();
    if (access === 'signed-in') return next();
    if (!access.some((role) => req.user!.roles.includes(role))) throw AppError.forbidden();
    next();
  };
}

type Method = RouteRecord['method'];
type Register = (path: string, access: Access, ...handlers: RequestHandler[]) => void;

/** A router whose every route declares its access; `prefix` is where app.ts mounts it. */
export function featureRouter(prefix: string) {
  const router = express.Router();
  const add =
    (method: Method): Register =>
    (path, access, ...handlers) => {
      const full = (prefix + path).replace(/\/$/, '') || '/';
      if (!routeTable.some((r) => r.method === method && r.path === full)) routeTable.push({ method, path: full, access });
      router[method](path, guard(access), ...handlers);
    };
  return { router, get: add('get'), post: add('post'), put: add('put'), patch: add('patch'), delete: add('delete') };
}

/** The signed-in user of a guarded route. */
export function currentUser(req: Request): User {
  if (!req.user) throw AppError.unauthenticated();
  return req.user;
}

export function hasRole(user: User | undefined, ...roles: Role[]) {
  return !!user && roles.some((r) => user.roles.includes(r));
}
