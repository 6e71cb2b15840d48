import { createBrowserRouter, type RouteObject } from "react-router-dom";
import type { ComponentType } from "react";
import type { Permission } from "../lib/contracts.ts";
import { Layout } from "./Layout.tsx";
import { LandingRedirect, RequirePermission, RequireSession } from "./guards.tsx";
import { RouteError } from "./RouteError.tsx";

// Each screen is its own chunk: `lazy` loads the module the first time its route matches.
type PageModule = Promise<{ default: ComponentType }>;
const page = (load: () => PageModule) => async () => ({ Component: (await load()).default });

/** Routes that need a permission share one guard element. */
function guarded(permission: Permission, children: RouteObject[]): RouteObject {
  return { element: <RequirePermission permission={permission} />, children };
}

export const routes: RouteObject[] = [
  { path: "/sign-in", lazy: page(() => import("../features/auth/SignInPage.tsx")), ErrorBoundary: RouteError },
  { path: "/set-password", lazy: page(() => import("../features/auth/SetPasswordPage.tsx")), ErrorBoundary: RouteError },
  { path: "/forgot-password", lazy: page(() => import("../features/auth/ForgotPasswordPage.tsx")), ErrorBoundary: RouteError },
  {
    element: <RequireSession />,
    ErrorBoundary: RouteError,
    children: [
      {
        element: <Layout />,
        ErrorBoundary: RouteError,
        children: [
          { index: true, element: <LandingRedirect /> },
          guarded("fleet.read", [
            { path: "fleet", lazy: page(() => import("../features/fleet/FleetPage.tsx")) },
            { path: "motors", lazy: page(() => import("../features/motors/MotorsPage.tsx")) },
            { path: "motors/:id", lazy: page(() => import("../features/motor/MotorPage.tsx")) },
            { path: "captures/:id", lazy: page(() => import("../features/spectrum/CapturePage.tsx")) },
          ]),
          guarded("review.read", [{ path: "review", lazy: page(() => import("../features/review/ReviewPage.tsx")) }]),
          guarded("motor-model.use", [{ path: "calculator", lazy: page(() => import("../features/calculator/CalculatorPage.tsx")) }]),
          guarded("captures.upload", [{ path: "upload", lazy: page(() => import("../features/upload/UploadPage.tsx")) }]),
          guarded("inspections.work", [{ path: "my-work", lazy: page(() => import("../features/my-work/MyWorkPage.tsx")) }]),
          guarded("inspections.plan", [{ path: "plan", lazy: page(() => import("../features/plan/PlanPage.tsx")) }]),
          guarded("users.manage", [{ path: "admin/*", lazy: page(() => import("../features/admin/AdminPage.tsx")) }]),
          guarded("outbox.read", [{ path: "outbox", lazy: page(() => import("../features/outbox/OutboxPage.tsx")) }]),
          { path: "*", lazy: page(() => import("./NotFoundPage.tsx")) },
        ],
      },
    ],
  },
];

export function createAppRouter() {
  return createBrowserRouter(routes);
}
