/** A step by name, with its reaction (species names) beside it when the name is a label of its own. */
import type { Names } from "./names";

export function StepName({ names, id }: { names: Names; id: string }) {
  const name = names.step(id);
  const reaction = names.reaction(id);
  return (
    <>
      {name}
      {reaction !== name && <span className="ml-1 text-xs text-ink-500">{reaction}</span>}
    </>
  );
}
