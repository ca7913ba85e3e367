/** The lab's quality core: control charts of reference runs and the precision of the sharpness reading. */
export * from "./control-chart.ts";
export * from "./precision.ts";
