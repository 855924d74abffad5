import { useNavigate } from "react-router";
import { useSignOut } from "../../api/session";
import { Button } from "../../components/ui/button";
import { paths } from "../../routes/paths";

export function SignOutButton() {
  const navigate = useNavigate();
  const signOut = useSignOut();
  return (
    <span className="inline-flex items-center gap-2">
      <Button
        variant="secondary"
        size="sm"
        pending={signOut.isPending}
        onClick={() => signOut.mutate(undefined, { onSuccess: () => navigate(paths.signIn(), { replace: true }) })}
      >
        Sign out
      </Button>
      {signOut.isError && (
        <span role="alert" className="text-sm font-bold text-brick">
          Could not sign out: {signOut.error.message}
        </span>
      )}
    </span>
  );
}
