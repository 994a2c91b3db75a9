/**
 * Nothing typed is lost by a stray click: while a form holds unsaved changes, leaving the page
 * inside the app asks first (React Router's useBlocker), and closing or reloading the tab asks
 * through the browser's own dialog (beforeunload). The form's own save is let through: call
 * `allowLeaving()` when it submits. One guard per page (a router supports one blocker at a time).
 */
import { useCallback, useEffect, useRef } from "react";
import { useBlocker, useNavigation, type BlockerFunction } from "react-router";

export function useLeaveGuard(dirty: boolean) {
  const allowed = useRef(false);
  const blocker = useBlocker(useCallback<BlockerFunction>(({ currentLocation, nextLocation }) => dirty && !allowed.current && currentLocation.pathname !== nextLocation.pathname, [dirty]));
  useEffect(() => {
    if (!dirty) {
      allowed.current = false;
      return;
    }
    const onUnload = (e: BeforeUnloadEvent) => {
      if (allowed.current) return;
      e.preventDefault();
      e.returnValue = "";
    };
    window.addEventListener("beforeunload", onUnload);
    return () => window.removeEventListener("beforeunload", onUnload);
  }, [dirty]);
  // A save that came back with an error leaves the page in place: guard it again.
  const navState = useNavigation().state;
  useEffect(() => {
    if (navState === "idle") allowed.current = false;
  }, [navState]);
  const allowLeaving = useCallback(() => {
    allowed.current = true;
  }, []);
  const dialog =
    blocker.state === "blocked" ? (
      <div role="alertdialog" aria-label="Unsaved changes" className="fixed inset-x-0 bottom-4 z-50 mx-auto w-[32rem] max-w-[95vw] rounded-md border border-brick-500 bg-white p-3 text-sm shadow-lg" data-testid="leave-guard">
        <p className="font-semibold">You have unsaved changes on this page.</p>
        <p className="mt-1 text-ink-700">Leaving now discards them.</p>
        <div className="mt-2 flex gap-2">
          <button type="button" className="btn-primary" onClick={() => blocker.reset()} autoFocus>
            Stay and keep editing
          </button>
          <button type="button" className="btn-quiet" onClick={() => blocker.proceed()}>
            Leave without saving
          </button>
        </div>
      </div>
    ) : null;
  return { allowLeaving, dialog };
}
