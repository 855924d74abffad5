import { useCurrentUser } from "../api/session";
import { PageHeader } from "../components/ui/layout";
import { ApiTokensPanel } from "../features/account/api-tokens-panel";
import { NotificationPreferencesForm } from "../features/account/notification-preferences";
import { PasswordForm } from "../features/account/password-form";
import { ProfileForm } from "../features/account/profile-form";

export function SettingsPage() {
  // RequireSession renders this page only with a signed-in user.
  const user = useCurrentUser();
  if (!user) return null;
  return (
    <>
      <title>Settings · Stagewright</title>
      <PageHeader title="Settings" />
      <div className="space-y-6">
        <ProfileForm user={user} />
        <PasswordForm />
        <NotificationPreferencesForm />
        <ApiTokensPanel />
      </div>
    </>
  );
}
