import { RouterProvider } from "react-router-dom";
import { AppProviders } from "./providers.tsx";
import { createAppRouter } from "./router.tsx";
import { queryClient } from "../lib/query.ts";

const router = createAppRouter();

export function App() {
  return (
    <AppProviders client={queryClient}>
      <RouterProvider router={router} />
    </AppProviders>
  );
}
