import { describe, expect, it } from "vitest";
import { hrcToHv, hvConversionSource } from "~/domain/hardness.ts";
import { cardValuesSourceInWords, stopRuleInWords, templateContent } from "~/domain/protocol.ts";

describe("16.11 values shown on screen carry their source", () => {
  it("an HV conversion says whether its ASTM E140 rows are in the references or from memory", () => {
    // Source: ASTM E140 table 1 as given in ../shared/docs/references.md: HRC 62 = 746 HV, 63 = 772 HV.
    expect(hrcToHv(62)).toBe(746);
    expect(hvConversionSource(62)).toBe("confirmed");
    // Hand-computed interpolation between two confirmed rows: 746 + 0.2·(772 − 746) = 751.2.
    expect(hrcToHv(62.2)).toBeCloseTo(751.2, 12);
    expect(hvConversionSource(62.2)).toBe("confirmed");
    // 59.6 HRC lies between 59 (from memory) and 60 (confirmed): the value rests on a row from memory.
    expect(hvConversionSource(59.6)).toBe("from memory");
    expect(hvConversionSource(56)).toBe("from memory");
    expect(() => hvConversionSource(70)).toThrow(/outside the ASTM E140 conversion table/);
  });

  it("a card protocol's stop rule, printed for the bench and shown on the run page, marks the ISO 8442-5 values from memory", () => {
    // Source: ISO 8442-5:2004 as summarised in ../shared/docs/references.md (from memory): pass marks 50 mm and 150 mm.
    const card = templateContent("card", "Card");
    expect(card.card!.valuesSource).toBe("from_memory");
    const words = stopRuleInWords(card);
    expect(words).toContain("pass mark 50 mm");
    expect(words).toContain("follow ISO 8442-5 from memory: check them against the standard's text");
    const checked = { ...card, card: { ...card.card!, valuesSource: "checked" as const } };
    expect(stopRuleInWords(checked)).toContain(cardValuesSourceInWords("checked"));
    expect(stopRuleInWords(checked)).not.toContain("from memory");
  });
});
