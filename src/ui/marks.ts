/** Set once, when the first screen shows the stored jobs: `npm run bench` times the start-up by it. */
export const FIRST_SCREEN_MARK = 'ripplewright:first-screen-usable';
