"""An `in` lookup on integer columns that leaves out numbers no row can hold.

SQLite stores integers in 64 bits, and its driver raises OverflowError for a larger Python int in a query. Django
already answers `pk=<huge>` with no rows, but not `pk__in=[<huge>]`, which every ModelMultipleChoiceField (a WPS's
PQRs, a weld's welders) and every list of ids from a form runs. A posted id of 20 digits must be "not one of the
choices", not a server error, so the values outside the column's range are dropped before the query is built
(they cannot match a row). Registered on IntegerField (and so on every auto, big and positive integer field) by
core.apps.
"""

from django.db.models import IntegerField
from django.db.models.lookups import In


@IntegerField.register_lookup
class IntegerFieldIn(In):
    def process_rhs(self, compiler, connection):
        if self.rhs_is_direct_value():
            low, high = connection.ops.integer_field_range(self.lhs.output_field.get_internal_type())
            self.rhs = [value for value in self.rhs
                        if not isinstance(value, int) or ((low is None or value >= low)
                                                          and (high is None or value <= high))]
        return super().process_rhs(compiler, connection)
