export { ReviewPanel, type ReviewPanelProps } from "./review-panel";
export { LifeCycleReviewStatus } from "./review-status";
export { openThreadCounts } from "./anchors";
