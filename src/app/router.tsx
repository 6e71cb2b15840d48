import { createBrowserRouter, type RouteObject } from "react-router-dom";
import type { ComponentType } from "react";
import type { Permission } from "../lib/contracts.ts";
import { Layout } from "./Layout.tsx";
import { LandingRedirect, RequirePermission, RequireSession } from "./guards.tsx";
import { RouteError } from "./RouteError.tsx";
import { PageLoading } from "../components/Spinner.tsx";

// Each screen is its own chunk: `lazy` loads the module the first time its route matches. Until the first
// route's chunk has arrived the router is not initialised and renders the HydrateFallback of that route (the
// guards and the Layout above it still render, so the header shows with a spinner where the page goes).
type PageModule = Promise<{ default: ComponentType }>;
const page = (load: () => PageModule): Pick<RouteObject, "lazy" | "HydrateFallback"> => ({
  lazy: async () => ({ Component: (await load()).default }),
  HydrateFallback: PageLoading,
});

/** Routes that need a permission share one guard element. */
function guarded(permission: Permission, children: RouteObject[]): RouteObject {
  return { element: <RequirePermission permission={permission} />, children };
}

export const routes: RouteObject[] = [
  { path: "/sign-in", ...page(() => import("../features/auth/SignInPage.tsx")), ErrorBoundary: RouteError },
  { path: "/set-password", ...page(() => import("../features/auth/SetPasswordPage.tsx")), ErrorBoundary: RouteError },
  { path: "/forgot-password", ...page(() => import("../features/auth/ForgotPasswordPage.tsx")), ErrorBoundary: RouteError },
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
            { path: "fleet", ...page(() => import("../features/fleet/FleetPage.tsx")) },
            { path: "motors", ...page(() => import("../features/motors/MotorsPage.tsx")) },
            { path: "motors/:id", ...page(() => import("../features/motor/MotorPage.tsx")) },
            { path: "captures/:id", ...page(() => import("../features/spectrum/CapturePage.tsx")) },
          ]),
          guarded("review.read", [{ path: "review", ...page(() => import("../features/review/ReviewPage.tsx")) }]),
          guarded("motor-model.use", [{ path: "calculator", ...page(() => import("../features/calculator/CalculatorPage.tsx")) }]),
          guarded("captures.upload", [{ path: "upload", ...page(() => import("../features/upload/UploadPage.tsx")) }]),
          guarded("inspections.work", [{ path: "my-work", ...page(() => import("../features/my-work/MyWorkPage.tsx")) }]),
          guarded("inspections.plan", [{ path: "plan", ...page(() => import("../features/plan/PlanPage.tsx")) }]),
          guarded("users.manage", [{ path: "admin/*", ...page(() => import("../features/admin/AdminPage.tsx")) }]),
          guarded("outbox.read", [{ path: "outbox", ...page(() => import("../features/outbox/OutboxPage.tsx")) }]),
          { path: "*", ...page(() => import("./NotFoundPage.tsx")) },
        ],
      },
    ],
  },
];

export function createAppRouter() {
  return createBrowserRouter(routes);
}
