// Enrolment by drag and drop on @dnd-kit/core (as sortable-list.tsx: useDraggable and
// useDroppable with the pointer and keyboard sensors). Blades are dragged from the
// library into an arm (parallel) or into the study (within-blade) and back. By
// keyboard: Space on a blade's handle picks it up, the arrow keys move it from one box
// to the next, Space drops it, Escape cancels; a screen reader hears each step.
// Retired and checked-out blades are shown with the reason and cannot be picked up.
import {
  DndContext,
  KeyboardSensor,
  PointerSensor,
  pointerWithin,
  rectIntersection,
  useDraggable,
  useDroppable,
  useSensor,
  useSensors,
  type Announcements,
  type CollisionDetection,
  type DragEndEvent,
  type KeyboardCoordinateGetter,
  type UniqueIdentifier,
} from "@dnd-kit/core";
import { useMemo, useState } from "react";

export const LIBRARY = "library";

export type BoardBlade = {
  id: string;
  inventoryNumber: string;
  detail: string;
  /** Where the blade is: LIBRARY, an arm id, or "study" (within-blade). */
  place: string;
  /** Why it cannot be enrolled, if it cannot. */
  refusal: string | null;
};

export type BoardBox = { id: string; title: string; hint?: string };

const collision: CollisionDetection = (args) => {
  const within = pointerWithin(args);
  return within.length ? within : rectIntersection(args);
};

/** Keyboard moves between boxes: each arrow press jumps the blade onto the centre of the next (or previous) box. */
function boxCoordinates(order: string[]): KeyboardCoordinateGetter {
  return (event, { currentCoordinates, context }) => {
    const forward = event.code === "ArrowRight" || event.code === "ArrowDown";
    const backward = event.code === "ArrowLeft" || event.code === "ArrowUp";
    if (!forward && !backward) return undefined;
    const { collisionRect, droppableRects, over } = context;
    if (!collisionRect) return undefined;
    event.preventDefault();
    const here = over ? order.indexOf(String(over.id)) : -1;
    const from = here >= 0 ? here : order.indexOf(String((context.active?.data.current as { place?: string } | undefined)?.place ?? LIBRARY));
    const next = Math.min(order.length - 1, Math.max(0, (from < 0 ? 0 : from) + (forward ? 1 : -1)));
    const rect = droppableRects.get(order[next]);
    if (!rect) return currentCoordinates;
    const cx = collisionRect.left + collisionRect.width / 2;
    const cy = collisionRect.top + collisionRect.height / 2;
    const tx = rect.left + rect.width / 2;
    const ty = rect.top + Math.min(rect.height / 2, 60);
    return { x: currentCoordinates.x + (tx - cx), y: currentCoordinates.y + (ty - cy) };
  };
}

export function EnrolmentBoard({
  boxes,
  blades,
  onMove,
  disabled,
}: {
  /** The library first, then the arms (or the study). */
  boxes: BoardBox[];
  blades: BoardBlade[];
  onMove: (bladeId: string, to: string) => void;
  disabled?: boolean;
}) {
  const order = useMemo(() => boxes.map((b) => b.id), [boxes]);
  const sensors = useSensors(
    useSensor(PointerSensor, { activationConstraint: { distance: 4 } }),
    useSensor(KeyboardSensor, { coordinateGetter: boxCoordinates(order) }),
  );
  const [active, setActive] = useState<UniqueIdentifier | null>(null);
  const [over, setOver] = useState<UniqueIdentifier | null>(null);
  const bladeName = (id: UniqueIdentifier) => blades.find((b) => b.id === id)?.inventoryNumber ?? "";
  const boxName = (id: UniqueIdentifier | undefined | null) => boxes.find((b) => b.id === id)?.title ?? "no box";

  const announcements: Announcements = {
    onDragStart: ({ active }) => `Picked up blade ${bladeName(active.id)}. Use the arrow keys to move it from box to box, Space to drop it, Escape to cancel.`,
    onDragOver: ({ active, over }) => (over ? `Blade ${bladeName(active.id)} is over ${boxName(over.id)}.` : `Blade ${bladeName(active.id)} is not over a box.`),
    onDragEnd: ({ active, over }) => (over ? `Blade ${bladeName(active.id)} dropped into ${boxName(over.id)}.` : `Blade ${bladeName(active.id)} dropped where it was.`),
    onDragCancel: ({ active }) => `Moving cancelled. Blade ${bladeName(active.id)} stays where it was.`,
  };

  const onDragEnd = (event: DragEndEvent) => {
    setActive(null);
    setOver(null);
    const { active, over } = event;
    if (!over) return;
    const blade = blades.find((b) => b.id === active.id);
    if (!blade || blade.place === over.id) return;
    onMove(blade.id, String(over.id));
  };

  return (
    <DndContext
      id="dnd-enrolment"
      sensors={sensors}
      collisionDetection={collision}
      onDragStart={(e) => setActive(e.active.id)}
      onDragOver={(e) => setOver(e.over?.id ?? null)}
      onDragEnd={onDragEnd}
      onDragCancel={() => {
        setActive(null);
        setOver(null);
      }}
      accessibility={{
        announcements,
        screenReaderInstructions: {
          draggable: "To move a blade, press Space on its handle, move it with the arrow keys from box to box, then press Space to drop it or Escape to cancel. The table below does the same without dragging.",
        },
      }}
    >
      <div className="grid gap-4 md:grid-cols-2" data-board="enrolment">
        {boxes.map((box) => (
          <Box key={box.id} box={box} highlighted={active !== null && over === box.id} blades={blades.filter((b) => b.place === box.id)} disabled={disabled} />
        ))}
      </div>
    </DndContext>
  );
}

function Box({ box, blades, highlighted, disabled }: { box: BoardBox; blades: BoardBlade[]; highlighted: boolean; disabled?: boolean }) {
  const { setNodeRef } = useDroppable({ id: box.id, disabled });
  const headingId = `box-${box.id}`;
  return (
    <section
      ref={setNodeRef}
      aria-labelledby={headingId}
      data-box={box.id}
      className={`min-h-32 rounded-lg border-2 p-3 ${highlighted ? "border-ink bg-paper-deep" : box.id === LIBRARY ? "border-dashed border-graphite-400 bg-paper" : "border-rule bg-card"}`}
    >
      <h3 id={headingId} className="font-bold">
        {box.title} <span className="figures font-normal text-graphite-600">({blades.filter((b) => !b.refusal || box.id !== LIBRARY).length})</span>
      </h3>
      {box.hint ? <p className="text-sm text-graphite-600">{box.hint}</p> : null}
      <ul className="mt-2 flex flex-col gap-2">
        {blades.map((b) => (
          <BladeCard key={b.id} blade={b} disabled={disabled} />
        ))}
        {blades.length === 0 ? <li className="text-sm text-graphite-600">Drop blades here.</li> : null}
      </ul>
    </section>
  );
}

function BladeCard({ blade, disabled }: { blade: BoardBlade; disabled?: boolean }) {
  const locked = disabled || (blade.refusal !== null && blade.place === LIBRARY);
  const { attributes, listeners, setNodeRef, setActivatorNodeRef, transform, isDragging } = useDraggable({ id: blade.id, disabled: locked, data: { place: blade.place } });
  const style: React.CSSProperties | undefined = transform
    ? { transform: `translate3d(${Math.round(transform.x)}px, ${Math.round(transform.y)}px, 0)`, position: "relative", zIndex: 10 }
    : undefined;
  return (
    <li
      ref={setNodeRef}
      style={style}
      data-blade={blade.inventoryNumber}
      data-dragging={isDragging ? "true" : undefined}
      className={`flex items-center gap-2 rounded border bg-card p-2 ${isDragging ? "border-ink shadow-lg" : "border-rule"} ${locked && blade.refusal ? "opacity-70" : ""}`}
    >
      <button
        type="button"
        ref={setActivatorNodeRef}
        {...attributes}
        {...listeners}
        disabled={locked}
        aria-label={`Drag blade ${blade.inventoryNumber}`}
        className="inline-flex min-h-target min-w-target shrink-0 cursor-grab touch-none items-center justify-center rounded border border-graphite-400 bg-paper text-xl text-graphite-800 active:cursor-grabbing disabled:cursor-not-allowed disabled:opacity-40"
      >
        <span aria-hidden="true">{locked && blade.refusal ? "⊘" : "⠿"}</span>
      </button>
      <div className="min-w-0">
        <p className="figures font-bold">{blade.inventoryNumber}</p>
        <p className="text-sm text-graphite-600">{blade.detail}</p>
        {blade.refusal ? (
          <p className="text-sm font-bold text-fault">
            <span aria-hidden="true">⊘ </span>
            {blade.refusal}
          </p>
        ) : null}
      </div>
    </li>
  );
}
