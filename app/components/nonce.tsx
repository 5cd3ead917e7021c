import { createContext, useContext } from "react";

/**
 * The Content-Security-Policy nonce of the current response, provided by entry.server. In the browser
 * it is empty: browsers hide nonces from the DOM, and hydrated scripts need none.
 */
export const NonceContext = createContext("");

export const useNonce = () => useContext(NonceContext);
