// The left-handed neck setting, kept on the device (the pad and the explorer keep it under the same key).
import { useCallback, useEffect, useState } from "react";

export const HANDED_KEY = "fretcall-left-handed";

/** Read after hydration, so the server render and the first client render agree. */
export function useLeftHanded(): [boolean, (left: boolean) => void] {
  const [leftHanded, setLeftHanded] = useState(false);
  useEffect(() => setLeftHanded(localStorage.getItem(HANDED_KEY) === "1"), []);
  const choose = useCallback((left: boolean) => {
    setLeftHanded(left);
    try {
      localStorage.setItem(HANDED_KEY, left ? "1" : "0");
    } catch {
      // Storage refused (private browsing): the choice holds for this page.
    }
  }, []);
  return [leftHanded, choose];
}

/** The switch for it, sized for a thumb. */
export function LeftHandedToggle({ value, onChange, className = "" }: { value: boolean; onChange: (left: boolean) => void; className?: string }) {
  return (
    <label className={`flex min-h-11 items-center gap-2 ${className}`}>
      <input type="checkbox" checked={value} onChange={(e) => onChange(e.target.checked)} className="h-5 w-5 accent-teal" />
      Left-handed neck
    </label>
  );
}
