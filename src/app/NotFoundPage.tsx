import { Page } from "../components/Page.tsx";
import { EmptyState } from "../components/EmptyState.tsx";
import { ButtonLink } from "../components/Button.tsx";

export default function NotFoundPage() {
  return (
    <Page title="Page not found">
      <EmptyState title="There is nothing at this address" action={<ButtonLink to="/">Go to your start page</ButtonLink>}>
        The link may be old, or the motor, capture or inspection may have been removed.
      </EmptyState>
    </Page>
  );
}
