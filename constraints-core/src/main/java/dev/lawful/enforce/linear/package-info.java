/**
 * Small dense linear algebra on caller-owned arrays, for per-sample solves that allocate nothing.
 *
 * <p>Internal: public only so that the planning and solving packages can share it; not part of the supported API.
 */
package dev.lawful.enforce.linear;
