import { describe, expect, it } from "vitest";
import { render } from "@testing-library/react";
import { mentionQuery, describeAnchor, anchorSpan } from "./anchors.ts";
import { highlightMentions } from "../components/review-panel.tsx";

const bands = [{ id: "pass", label: "Passband", start: 500, stop: 600, quantity: "T" as const, polarization: "u" as const, angleDeg: 0, requirement: "min" as const, value: 90 }];

describe("review anchors and mentions", () => {
  it("finds the @mention being typed at the caret", () => {
    expect(mentionQuery("see @ils", 8)).toEqual({ start: 4, query: "ils" });
    expect(mentionQuery("mail a@b", 8)).toBeNull(); // inside an address, not a mention
    expect(mentionQuery("@ilse done", 10)).toBeNull(); // a space ends the mention
  });

  it("describes anchors and their wavelength spans", () => {
    expect(describeAnchor({ kind: "band", bandId: "pass" }, bands)).toBe("Band Passband (500–600 nm)");
    expect(describeAnchor({ kind: "layer", index: 2 }, bands)).toBe("Layer 3");
    expect(anchorSpan({ kind: "band", bandId: "pass" }, bands)).toEqual({ start: 500, stop: 600 });
    expect(anchorSpan({ kind: "design" }, bands)).toBeNull();
  });

  it("marks mentions of members by name (with spaces) or e-mail", () => {
    const { container } = render(<p>{highlightMentions("Ask @Sunniva Achterberg and @designer@halvorsen.example today", ["Sunniva Achterberg", "designer@halvorsen.example"])}</p>);
    const marks = [...container.querySelectorAll("span")].map((s) => s.textContent);
    expect(marks).toEqual(["@Sunniva Achterberg", "@designer@halvorsen.example"]);
  });
});
