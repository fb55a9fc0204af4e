package sequential

import "probity/plan"

type planRule = plan.SequentialRule
