import { useNavigation } from "react-router";
import { useEffect, useState } from "react";

/** A thin bar under the header while a navigation or form submission is under way. */
export function NavigationProgress() {
  const navigation = useNavigation();
  const busy = navigation.state !== "idle";
  // Wait a moment before showing it, so fast pages don't flicker.
  const [visible, setVisible] = useState(false);
  useEffect(() => {
    if (!busy) return setVisible(false);
    const timer = setTimeout(() => setVisible(true), 150);
    return () => clearTimeout(timer);
  }, [busy]);
  return (
    <div className="relative h-1 overflow-hidden" aria-hidden={!visible}>
      {visible ? (
        <>
          <div className="nav-progress absolute inset-y-0 left-0 w-2/5 bg-ink" data-testid="navigation-progress" />
          <span className="sr-only" role="status">
            {navigation.state === "submitting" ? "Saving…" : "Loading…"}
          </span>
        </>
      ) : null}
    </div>
  );
}
