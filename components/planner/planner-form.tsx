import { buttonClasses } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { Input } from "@/components/ui/input";
import { Select } from "@/components/ui/select";
import type { EclipseDto } from "@/lib/eclipses/eclipses";
import type { KitDto } from "@/lib/kits/kits";
import type { PathLines } from "@/lib/planner/path";
import type { PlannerFieldProblem, PlannerQuery } from "@/lib/planner/resolve";
import { SENSOR_FORMATS } from "@/lib/planner/sensor-formats";
import type { SiteDto } from "@/lib/sites/sites";
import { WorldPicker } from "./world-picker";

const MOUNT_OPTIONS = [
  { value: "", label: "Not given" },
  { value: "equatorial", label: "Equatorial" },
  { value: "alt-az", label: "Alt-azimuth" },
  { value: "fixed-tripod", label: "Fixed tripod" },
  { value: "hand-held", label: "Hand-held" },
  { value: "stabilised", label: "Stabilised platform" },
];

const ZONES = ["UTC", ...Intl.supportedValuesOf("timeZone").filter((z) => z !== "UTC")];

/**
 * The planner's choices as a plain GET form: the result is a shareable address
 * and works without JavaScript (the map picker needs it; the fields do not).
 */
export function PlannerForm({
  query,
  eclipses,
  sites,
  kits,
  eclipseId,
  path,
  problems = [],
}: {
  query: PlannerQuery;
  eclipses: EclipseDto[];
  sites: SiteDto[] | null;
  kits: KitDto[] | null;
  eclipseId: string;
  path?: PathLines | null;
  /** Values from the address that were refused, shown beside their fields. */
  problems?: PlannerFieldProblem[];
}) {
  const errorFor = (field: keyof PlannerQuery) => problems.find((p) => p.field === field)?.message;
  const sensorChoice = query.sw !== undefined && query.sh !== undefined ? "custom" : (query.sensor ?? "");
  return (
    <form method="get" action="/planner" className="flex flex-col gap-6 rounded-card border border-line bg-surface-raised p-5 print:hidden">
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="Eclipse" error={errorFor("eclipse")}>
          <Select
            name="eclipse"
            defaultValue={eclipseId}
            options={eclipses.map((e) => ({ value: e.id, label: `${e.id} ${e.kind}${e.name ? `: ${e.name}` : ""}` }))}
          />
        </Field>
        <Field label="Time zone for local times" error={errorFor("tz")}>
          <Select name="tz" defaultValue={query.tz} options={ZONES.map((z) => ({ value: z, label: z }))} />
        </Field>
      </div>
      <fieldset className="flex flex-col gap-4">
        <legend className="mb-2 text-lg font-semibold">Where</legend>
        {sites && sites.length ? (
          <Field label="One of your sites" error={errorFor("site")} hint="Leave on “typed or picked place” to use the fields below.">
            <Select
              name="site"
              defaultValue={query.site ?? ""}
              options={[{ value: "", label: "Typed or picked place" }, ...sites.map((s) => ({ value: s.id, label: `${s.name}${s.kind === "moving" ? " (moving)" : ""}` }))]}
            />
          </Field>
        ) : null}
        <Field label="Place name (optional)" error={errorFor("place")}>
          <Input name="place" defaultValue={query.place ?? ""} maxLength={80} />
        </Field>
        <WorldPicker lat={query.lat} lon={query.lon} elev={query.elev} path={path} errors={{ lat: errorFor("lat"), lon: errorFor("lon"), elev: errorFor("elev") }} />
        <p className="text-sm text-ink-muted">With no place given, the planner uses the point of greatest eclipse.</p>
      </fieldset>
      <fieldset className="grid gap-4 sm:grid-cols-4">
        <legend className="mb-2 text-lg font-semibold">With what</legend>
        {kits && kits.length ? (
          <Field label="One of your kits" className="sm:col-span-4" error={errorFor("kit")}>
            <Select
              name="kit"
              defaultValue={query.kit ?? ""}
              options={[{ value: "", label: "The lens described below" }, ...kits.map((k) => ({ value: k.id, label: `${k.name} (${k.camera})` }))]}
            />
          </Field>
        ) : null}
        <Field label="f-number" error={errorFor("f")}>
          <Input name="f" type="number" step="any" min={0.5} max={128} defaultValue={query.f ?? 8} />
        </Field>
        <Field label="Focal length (mm)" hint="For the framing drawing." error={errorFor("focal")}>
          <Input name="focal" type="number" step="any" min={1} defaultValue={query.focal ?? ""} />
        </Field>
        <Field label="Mount" error={errorFor("mount")}>
          <Select name="mount" defaultValue={query.mount ?? ""} options={MOUNT_OPTIONS} />
        </Field>
        <Field label="ISO speeds" hint="Up to six, separated by commas." error={errorFor("isos")}>
          <Input name="isos" defaultValue={query.isos.join(",")} />
        </Field>
        <Field label="Sensor" hint="For the framing drawing: a common format, or type its size." className="sm:col-span-2" error={errorFor("sensor")}>
          <Select
            name="sensor"
            defaultValue={sensorChoice}
            options={[{ value: "", label: "Not given" }, ...SENSOR_FORMATS.map((f) => ({ value: f.key, label: f.label })), { value: "custom", label: "Another size (typed beside)" }]}
          />
        </Field>
        <Field label="Sensor width (mm)" hint="Typed sizes win over the list." error={errorFor("sw")}>
          <Input name="sw" type="number" step="any" min={1} max={100} defaultValue={query.sw ?? ""} inputMode="decimal" />
        </Field>
        <Field label="Sensor height (mm)" hint="Both sizes are needed." error={errorFor("sh")}>
          <Input name="sh" type="number" step="any" min={1} max={100} defaultValue={query.sh ?? ""} inputMode="decimal" />
        </Field>
      </fieldset>
      <div>
        <button type="submit" className={buttonClasses({ variant: "primary" })}>
          Plan
        </button>
      </div>
    </form>
  );
}
