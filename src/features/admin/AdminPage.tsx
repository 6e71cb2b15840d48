import { NavLink, Route, Routes } from "react-router-dom";
import { Page } from "../../components/Page.tsx";
import { UsersPanel } from "./UsersPanel.tsx";
import { SitesPanel } from "./SitesPanel.tsx";
import { ImportPanel } from "./ImportPanel.tsx";
import { GatewaysPanel } from "./GatewaysPanel.tsx";
import NotFoundPage from "../../app/NotFoundPage.tsx";

const TABS = [
  { to: "/admin", label: "Users", end: true },
  { to: "/admin/sites", label: "Sites and areas" },
  { to: "/admin/import", label: "Motor register import" },
  { to: "/admin/gateways", label: "Gateways" },
];

export default function AdminPage() {
  return (
    <Page title="Admin" description="People and their roles, where motors stand, the motor register and site gateways." wide>
      <nav aria-label="Admin sections" className="mb-5 flex flex-wrap gap-1 border-b border-line">
        {TABS.map((t) => (
          <NavLink
            key={t.to}
            to={t.to}
            end={t.end}
            className={({ isActive }) => `-mb-px border-b-2 px-3 py-2 font-medium no-underline ${isActive ? "border-brand text-brand-strong" : "border-transparent text-ink-muted hover:text-ink"}`}
          >
            {t.label}
          </NavLink>
        ))}
      </nav>
      <Routes>
        <Route index element={<UsersPanel />} />
        <Route path="sites" element={<SitesPanel />} />
        <Route path="import" element={<ImportPanel />} />
        <Route path="gateways" element={<GatewaysPanel />} />
        <Route path="*" element={<NotFoundPage />} />
      </Routes>
    </Page>
  );
}
