"use client";
import { useEffect, useState } from "react";
import { Button } from "@/components/ui/button";

/**
 * Red on black for the field: keeps dark adaptation. Sets data-night on <html>;
 * globals.css maps every colour token to dim reds while it is on.
 */
export function NightModeToggle() {
  const [on, setOn] = useState(false);
  useEffect(() => {
    if (on) document.documentElement.dataset.night = "on";
    else delete document.documentElement.dataset.night;
    return () => {
      delete document.documentElement.dataset.night;
    };
  }, [on]);
  return (
    // The pressed state shows in the button itself: filled with a lit lamp when on, outlined when off.
    <Button size="sm" variant={on ? "primary" : "secondary"} aria-pressed={on} onClick={() => setOn(!on)}>
      <span aria-hidden="true" className={on ? "inline-block size-2.5 rounded-full bg-current" : "inline-block size-2.5 rounded-full border border-current"} />
      Night red
      <span aria-hidden="true" className="font-normal">{on ? "on" : "off"}</span>
    </Button>
  );
}
