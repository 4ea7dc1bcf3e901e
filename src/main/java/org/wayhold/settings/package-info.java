/**
 * Plain, validated settings records for the numerical core and the service. They know nothing of
 * YAML: {@code org.wayhold.config} reads {@code config/wayhold.yaml} into them. Every field carries its
 * unit in its name; every record has a {@code defaults()} factory holding the built-in defaults that
 * {@code config/wayhold.yaml} documents.
 */
package org.wayhold.settings;
