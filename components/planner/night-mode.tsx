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
    <Button size="sm" aria-pressed={on} onClick={() => setOn(!on)}>
      Night red
    </Button>
  );
}
