/* XPath helpers the Check tests of the web page and the handout share. */
#ifndef UG_TESTS_XPATH_CHECK_H
#define UG_TESTS_XPATH_CHECK_H

#include <libxml/xpath.h>
#include <stdio.h>

static inline double xpath_number(xmlDocPtr doc, const char *expr)
{
    xmlXPathContextPtr ctx = xmlXPathNewContext(doc);
    xmlXPathObjectPtr r = xmlXPathEvalExpression((const xmlChar *)expr, ctx);
    double v = r ? xmlXPathCastToNumber(r) : -1;
    xmlXPathFreeObject(r);
    xmlXPathFreeContext(ctx);
    return v;
}

/* The expression's string value into buf. */
static inline char *xpath_string(xmlDocPtr doc, const char *expr, char *buf,
                                 size_t size)
{
    xmlXPathContextPtr ctx = xmlXPathNewContext(doc);
    xmlXPathObjectPtr r = xmlXPathEvalExpression((const xmlChar *)expr, ctx);
    xmlChar *s = r ? xmlXPathCastToString(r) : NULL;
    snprintf(buf, size, "%s", s ? (const char *)s : "");
    xmlFree(s);
    xmlXPathFreeObject(r);
    xmlXPathFreeContext(ctx);
    return buf;
}

#endif
