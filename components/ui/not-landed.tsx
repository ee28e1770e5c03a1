import { Notice } from "./notice";

export type NotLandedProps = { what: string };

/** Shown by a page whose feature is not built yet: plain words, never sample data. */
export function NotLanded({ what }: NotLandedProps) {
  return (
    <div className="px-4 md:px-8 py-8">
      <Notice title="Not available yet">
        {what} is not part of this version of Hearth yet. Nothing on this page is sample data.
      </Notice>
    </div>
  );
}
