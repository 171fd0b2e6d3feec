export { CostEstimate, estimateCost, formatComputeSeconds, formatUsd } from "./CostEstimate";
