// A reorderable list built on @dnd-kit/core alone: each row is both draggable (by its
// handle) and a drop target. Works with a pointer, with the keyboard (Space on the
// handle, arrow keys, Space to drop, Escape to cancel) and with plain Move up / Move
// down buttons. A screen reader hears where the item is at every step.
import {
  DndContext,
  KeyboardSensor,
  PointerSensor,
  closestCenter,
  useDraggable,
  useDroppable,
  useSensor,
  useSensors,
  type Announcements,
  type DragEndEvent,
  type KeyboardCoordinateGetter,
  type UniqueIdentifier,
} from "@dnd-kit/core";
import { useCallback, useState } from "react";

export type Keyed<T> = { key: string; value: T };

/** Moves an item of a list from one index to another; other items keep their order. */
export function moveItem<T>(list: readonly T[], from: number, to: number): T[] {
  if (from === to || from < 0 || to < 0 || from >= list.length || to >= list.length) return [...list];
  const next = [...list];
  const [item] = next.splice(from, 1);
  next.splice(to, 0, item);
  return next;
}

/**
 * Keyboard moves for a vertical list: ArrowDown/ArrowUp jump the dragged row onto the
 * centre of the next/previous row, so every key press lands on exactly one target.
 */
const verticalListCoordinates: KeyboardCoordinateGetter = (event, { currentCoordinates, context }) => {
  if (event.code !== "ArrowDown" && event.code !== "ArrowUp") return undefined;
  const { collisionRect, droppableRects, droppableContainers } = context;
  if (!collisionRect) return undefined;
  event.preventDefault();
  const centre = collisionRect.top + collisionRect.height / 2;
  let target: { centre: number } | null = null;
  for (const container of droppableContainers.getEnabled()) {
    const rect = droppableRects.get(container.id);
    if (!rect) continue;
    const c = rect.top + rect.height / 2;
    if (event.code === "ArrowDown" ? c > centre + 1 : c < centre - 1) {
      if (!target || (event.code === "ArrowDown" ? c < target.centre : c > target.centre)) target = { centre: c };
    }
  }
  if (!target) return currentCoordinates;
  return { x: currentCoordinates.x, y: currentCoordinates.y + (target.centre - centre) };
};

type Props<T> = {
  /** A fixed id for this list (keeps server and browser renders alike). */
  id: string;
  /** What one item is called: "step", "position", "checklist item". */
  noun: string;
  items: Keyed<T>[];
  /** A short description of an item, read out while it moves and used in button labels. */
  describe: (value: T, index: number) => string;
  onMove: (from: number, to: number) => void;
  children: (item: Keyed<T>, index: number) => React.ReactNode;
  /** Extra controls at the end of each row (e.g. Remove). */
  rowActions?: (item: Keyed<T>, index: number) => React.ReactNode;
  disabled?: boolean;
};

export function SortableList<T>({ id, noun, items, describe, onMove, children, rowActions, disabled }: Props<T>) {
  const sensors = useSensors(
    useSensor(PointerSensor, { activationConstraint: { distance: 4 } }),
    useSensor(KeyboardSensor, { coordinateGetter: verticalListCoordinates }),
  );
  const [activeKey, setActiveKey] = useState<UniqueIdentifier | null>(null);
  const [overKey, setOverKey] = useState<UniqueIdentifier | null>(null);

  const indexOf = (key: UniqueIdentifier) => items.findIndex((i) => i.key === key);
  const label = (key: UniqueIdentifier) => {
    const i = indexOf(key);
    return i >= 0 ? describe(items[i].value, i) : "";
  };
  const Noun = noun.charAt(0).toUpperCase() + noun.slice(1);
  const n = items.length;

  const announcements: Announcements = {
    onDragStart: ({ active }) =>
      `Picked up ${noun} ${indexOf(active.id) + 1} of ${n}: ${label(active.id)}. Use the up and down arrow keys to move it, Space to drop it, Escape to cancel.`,
    onDragOver: ({ active, over }) =>
      over ? `${Noun} ${label(active.id)} is over position ${indexOf(over.id) + 1} of ${n}.` : `${Noun} ${label(active.id)} is not over a position.`,
    onDragEnd: ({ active, over }) =>
      over
        ? `${Noun} ${label(active.id)} dropped at position ${indexOf(over.id) + 1} of ${n}.`
        : `${Noun} ${label(active.id)} dropped where it was, at position ${indexOf(active.id) + 1} of ${n}.`,
    onDragCancel: ({ active }) => `Moving cancelled. ${Noun} ${label(active.id)} stays at position ${indexOf(active.id) + 1} of ${n}.`,
  };

  const onDragEnd = (event: DragEndEvent) => {
    setActiveKey(null);
    setOverKey(null);
    const { active, over } = event;
    if (!over || over.id === active.id) return;
    const from = indexOf(active.id);
    const to = indexOf(over.id);
    if (from >= 0 && to >= 0) onMove(from, to);
  };

  const activeIndex = activeKey === null ? -1 : indexOf(activeKey);
  return (
    <DndContext
      id={`dnd-${id}`}
      sensors={sensors}
      collisionDetection={closestCenter}
      onDragStart={(e) => setActiveKey(e.active.id)}
      onDragOver={(e) => setOverKey(e.over?.id ?? null)}
      onDragEnd={onDragEnd}
      onDragCancel={() => {
        setActiveKey(null);
        setOverKey(null);
      }}
      accessibility={{
        announcements,
        screenReaderInstructions: {
          draggable: `To move a ${noun}, press Space on its handle, move it with the up and down arrow keys, then press Space to drop it or Escape to cancel. The Move up and Move down buttons do the same.`,
        },
      }}
    >
      <ol className="flex flex-col gap-2" data-list={id}>
        {items.map((item, index) => {
          const overIndex = overKey === null ? -1 : indexOf(overKey);
          const marker = activeIndex >= 0 && overIndex === index && overIndex !== activeIndex ? (overIndex > activeIndex ? "after" : "before") : null;
          return (
            <SortableRow
              key={item.key}
              id={item.key}
              index={index}
              count={n}
              noun={noun}
              label={describe(item.value, index)}
              marker={marker}
              disabled={disabled}
              onMove={onMove}
              actions={rowActions?.(item, index)}
            >
              {children(item, index)}
            </SortableRow>
          );
        })}
      </ol>
    </DndContext>
  );
}

function SortableRow({
  id,
  index,
  count,
  noun,
  label,
  marker,
  disabled,
  onMove,
  actions,
  children,
}: {
  id: string;
  index: number;
  count: number;
  noun: string;
  label: string;
  marker: "before" | "after" | null;
  disabled?: boolean;
  onMove: (from: number, to: number) => void;
  actions?: React.ReactNode;
  children: React.ReactNode;
}) {
  const { attributes, listeners, setNodeRef: setDragRef, setActivatorNodeRef, transform, isDragging } = useDraggable({ id, disabled });
  const { setNodeRef: setDropRef } = useDroppable({ id, disabled });
  const ref = useCallback(
    (el: HTMLLIElement | null) => {
      setDragRef(el);
      setDropRef(el);
    },
    [setDragRef, setDropRef],
  );
  const style: React.CSSProperties | undefined = transform
    ? { transform: `translate3d(${Math.round(transform.x)}px, ${Math.round(transform.y)}px, 0)`, position: "relative", zIndex: 10 }
    : undefined;
  const markerClass = marker === "before" ? "border-t-4 border-t-ink" : marker === "after" ? "border-b-4 border-b-ink" : "";
  return (
    <li
      ref={ref}
      style={style}
      data-dragging={isDragging ? "true" : undefined}
      className={`flex items-start gap-2 rounded border bg-card p-2 ${isDragging ? "border-ink shadow-lg" : "border-rule"} ${markerClass}`}
    >
      <button
        type="button"
        ref={setActivatorNodeRef}
        {...attributes}
        {...listeners}
        aria-label={`Drag ${noun} ${index + 1}: ${label}`}
        className="inline-flex min-h-target min-w-target shrink-0 cursor-grab touch-none items-center justify-center rounded border border-graphite-400 bg-paper text-xl text-graphite-800 active:cursor-grabbing"
      >
        <span aria-hidden="true">⠿</span>
      </button>
      <span className="figures mt-3 w-6 shrink-0 text-right font-bold text-graphite-600" aria-hidden="true">
        {index + 1}
      </span>
      <div className="min-w-0 flex-1">{children}</div>
      <div className="flex shrink-0 flex-col gap-1 sm:flex-row">
        <button
          type="button"
          onClick={() => onMove(index, index - 1)}
          disabled={disabled || index === 0}
          aria-label={`Move ${noun} ${index + 1} up: ${label}`}
          className="min-h-target rounded border border-graphite-400 bg-card px-2 text-sm font-bold disabled:opacity-40"
        >
          <span aria-hidden="true">↑ </span>Move up
        </button>
        <button
          type="button"
          onClick={() => onMove(index, index + 1)}
          disabled={disabled || index === count - 1}
          aria-label={`Move ${noun} ${index + 1} down: ${label}`}
          className="min-h-target rounded border border-graphite-400 bg-card px-2 text-sm font-bold disabled:opacity-40"
        >
          <span aria-hidden="true">↓ </span>Move down
        </button>
        {actions}
      </div>
    </li>
  );
}
