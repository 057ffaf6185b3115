// Each feature that makes attachments or needs periodic work registers it here, so the
// worker process loads it. (Imports only; see registerAttachment / registerPeriodic.)
export {};
