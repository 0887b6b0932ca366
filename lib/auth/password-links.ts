/**
 * How long a password link works. A welcome link waits a week, as an invitation does; a reset link is
 * short-lived (common practice: hours, not days, for a link that replaces a password).
 */
export const WELCOME_LINK_DAYS = 7;
export const RESET_LINK_HOURS = 24;
