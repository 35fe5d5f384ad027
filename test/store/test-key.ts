/** A fixed member id key for tests (invented). */
export const TEST_KEY = "test-key-0123456789abcdef0123456789abcdef";
